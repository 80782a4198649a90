/**
 * The block-generator text field shared by the design form and the planner's candidates: words
 * separated by commas or semicolons, offered for two-level designs once blocks are asked for.
 */

/** Two-level methods, whose block generators the engineer may name. */
const TWO_LEVEL = ['full-factorial', 'fractional-factorial'];

/** Block generator words from the text field ("ABC, CDE" → ["ABC", "CDE"]). */
export function blockGeneratorWords(text: string): string[] {
  return text
    .split(/[,;]/)
    .map((w) => w.trim())
    .filter(Boolean);
}

/** The field is shown once blocks are asked for on a two-level design (or text is already in it). */
export function showsBlockGenerators(f: { method: string; blocks: string; blockGenerators: string }): boolean {
  return TWO_LEVEL.includes(f.method) && (Number(f.blocks) > 1 || f.blockGenerators.trim() !== '');
}
