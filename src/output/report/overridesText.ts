import { plain } from "./printNumbers.js";

/** What summary.json records of `--permutations`/`--seed` (options.inference.command_line_overrides). */
export interface RecordedOverrides {
  permutations?: number;
  seed?: number;
  design: { permutations?: number; seed?: number };
}

/**
 * One sentence for the methods (and strength's notes) when the command line replaced the design's number of
 * relabelings or seed, e.g. "The number of relabelings asked for (200) and the random seed (7) were given on
 * the command line in place of the design file's (5000 and 42)." Empty when nothing was replaced.
 */
export function overridesSentence(overrides: RecordedOverrides | null | undefined): string {
  if (!overrides) return "";
  const given: string[] = [];
  const design: string[] = [];
  if (overrides.permutations !== undefined) {
    given.push(`the number of relabelings asked for (${plain(overrides.permutations)})`);
    design.push(plain(overrides.design.permutations ?? NaN));
  }
  if (overrides.seed !== undefined) {
    given.push(`the random seed (${plain(overrides.seed)})`);
    design.push(plain(overrides.design.seed ?? NaN));
  }
  if (given.length === 0) return "";
  const subject = given.join(" and ");
  return `${subject.charAt(0).toUpperCase()}${subject.slice(1)} ${given.length > 1 ? "were" : "was"} given on the command line in place of the design file's (${design.join(" and ")}).`;
}

/** The report's row: e.g. "--permutations 200 (design: 5000), --seed 7 (design: 42)". */
export function overridesRow(overrides: RecordedOverrides): string {
  const parts: string[] = [];
  if (overrides.permutations !== undefined) parts.push(`--permutations ${overrides.permutations} (design: ${overrides.design.permutations})`);
  if (overrides.seed !== undefined) parts.push(`--seed ${overrides.seed} (design: ${overrides.design.seed})`);
  return parts.join(", ");
}
