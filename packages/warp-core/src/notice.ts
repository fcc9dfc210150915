/**
 * Remarks and warnings from the core, as data: which rule found it, which rig or measurement path it
 * is about, and its lengths in metres. The core names no command-line flags and no units: `text`
 * holds placeholders that the caller fills in its own words — {length:NAME} for lengths[NAME] in the
 * rig's units, {option:NAME} for an option by its name in the core's options object ("robust",
 * "grid", "vary").
 */
export interface Notice {
  /** What was found, e.g. "fit.outlier", "bake.tolerance-unmet". */
  rule: string;
  /** The dotted rig or measurement path it is about, when there is one. */
  parameter?: string;
  /** Lengths the text refers to, metres. */
  lengths?: Record<string, number>;
  text: string;
}

export function notice(rule: string, text: string, extra: { parameter?: string; lengths?: Record<string, number> } = {}): Notice {
  return { rule, ...extra, text };
}

/** The notice's text with lengths and option names filled in by the caller's own wording. */
export function wordNotice(n: Notice, wordLength: (metres: number) => string, wordOption: (option: string) => string): string {
  return n.text.replace(/\{(length|option):(\w+)\}/g, (whole: string, kind: string, name: string) => {
    if (kind === 'option') return wordOption(name);
    const metres = n.lengths?.[name];
    return metres === undefined ? whole : wordLength(metres);
  });
}
