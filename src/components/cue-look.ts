/** How a cue class is shown to the participant: a readable label and, where it has one, a direction. */

export type CueDirection = 'left' | 'right' | 'up' | 'down' | null;

/** 'left-hand' -> 'Left hand', 'T1' -> 'T1'. */
export function humanLabel(label: string): string {
  const text = label.replace(/[-_]+/g, ' ').trim();
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** Left/right for lateral tasks, down for feet, up for tongue; null when the label names no side. */
export function cueDirection(label: string): CueDirection {
  if (/left/i.test(label)) return 'left';
  if (/right/i.test(label)) return 'right';
  if (/(feet|foot)/i.test(label)) return 'down';
  if (/tongue/i.test(label)) return 'up';
  return null;
}

/** Which end of a two-class feedback bar a class sits at: its own side if it names one, else class order. */
export function barSide(label: string, classes: readonly string[]): 'left' | 'right' {
  const d = cueDirection(label);
  if (d === 'left' || d === 'right') return d;
  return classes.indexOf(label) === 1 ? 'right' : 'left';
}
