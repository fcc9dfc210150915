/** The CLI words the core's notices and option errors with its own flags and the rig's units. */
import { describe, expect, it } from 'vitest';
import { OptionError, RigError, type Notice } from '@skyfold/warp-core';
import { optionFlag, wordNotice, wordRigError } from '../src/messages.js';

describe('core messages in the CLI words', () => {
  it('names each option the core mentions by its flag', () => {
    expect(['robust', 'free', 'grid', 'vary'].map(optionFlag)).toEqual(['--robust', '--free', '--grid', '--vary']);
    expect(optionFlag('masterSize')).toBe('--master-size');
  });

  it('puts lengths in the rig units and options as flags', () => {
    const n: Notice = { rule: 'plan.floor-assumed', parameter: 'dome.floor', lengths: { depth: 1.25 }, text: 'keeps parts above {length:depth} below the springline; try {option:vary}' };
    expect(wordNotice(n, 'm')).toBe('keeps parts above 1.25 m below the springline; try --vary');
    expect(wordNotice(n, 'ft')).toBe('keeps parts above 4 ft 1.21 in below the springline; try --vary');
  });

  it('an option error names the flag; a rig error its field', () => {
    expect(wordRigError(new OptionError('vary', 'nothing to vary'))).toBe('--vary: nothing to vary');
    expect(wordRigError(new RigError('mirror.radius', 'expected a positive length'))).toBe('mirror.radius: expected a positive length');
  });
});
