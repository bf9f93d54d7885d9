// Tag lines: how a line's pull stands against what one person can hold (as render/palette.py says).

// Palette colour of a line (and its person) by the state of its pull.
export const TAG_LINE_COLOUR = { slack: "tag_line", held: "tag_line", near: "near", over: "warn" };

// "slack" (no pull), "held", "near" (from nearShare of the limit) or "over" (above maxPull: let go).
export function tagLineState(pull, maxPull, nearShare) {
  if (pull === null || !(pull > 0)) return "slack";
  if (pull > maxPull) return "over";
  if (pull >= nearShare * maxPull) return "near";
  return "held";
}
