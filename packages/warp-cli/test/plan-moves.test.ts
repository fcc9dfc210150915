/** `skyfold plan` says each candidate's moves in the room's words, in the rig's units. */
import { describe, expect, it } from 'vitest';
import { wordMoves } from '../src/commands/plan.js';

describe('plan moves', () => {
  it('reads as an operator would say it', () => {
    const moves = [
      { part: 'projector' as const, direction: 'toward the mirror', metres: 0.14 },
      { part: 'projector' as const, direction: 'lower', metres: 0.05 },
      { part: 'aim' as const, direction: 'up', degrees: 2.2 },
    ];
    expect(wordMoves(moves, 'm')).toBe('projector 14 cm toward the mirror and 5 cm lower; aim 2° up');
    expect(wordMoves(moves, 'ft')).toBe('projector 5.5 in toward the mirror and 2 in lower; aim 2° up');
    expect(wordMoves([], 'm')).toBe('no move');
  });
});
