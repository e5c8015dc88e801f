import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";
import { parseTsv } from "../../src/io/tsv.js";

// Reference: separate single-threshold runs with the same seed (the issue's
// definition of a sweep: the same permutations, thresholded several times).

function sink() {
  const s = { stdout: "", stderr: "", out: (t: string) => void (s.stdout += t), err: (t: string) => void (s.stderr += t), errIsTerminal: false };
  return s;
}

describe("a threshold sweep equals separate runs at each threshold", () => {
  let base: string;
  const thresholds = [2.5, 3, 3.5];
  const design = (threshold: string, method = "components") =>
    [
      "subjects: cohort/participants.tsv",
      "connectomes: cohort/connectomes/{participant_id}.tsv",
      "regions: cohort/regions.tsv",
      "model: group + age",
      "levels: { group: [control, patient] }",
      "transform: fisher-z",
      "contrasts:",
      "  up: group[patient] - group[control]",
      "inference:",
      `  method: ${method}`,
      `  threshold: ${threshold}`,
      "  permutations: 299",
      "  seed: 5",
      "  tail: both",
    ].join("\n");

  beforeAll(async () => {
    base = mkdtempSync(path.join(os.tmpdir(), "plexus-sweep-"));
    const args = ["simulate", "--out", path.join(base, "cohort"), "--seed", "21", "--regions", "14", "--patients", "12", "--controls", "12", "--effect-regions", "5", "--effect-size", "1.4"];
    expect(await main(args, sink())).toBe(0);
    writeFileSync(path.join(base, "sweep.yaml"), design(`[${thresholds.join(", ")}]`));
    expect(await main(["run", path.join(base, "sweep.yaml"), "--out", path.join(base, "sweep"), "-q", "--threads", "1"], sink())).toBe(0);
    for (const t of thresholds) {
      writeFileSync(path.join(base, `single-${t}.yaml`), design(String(t)));
      expect(await main(["run", path.join(base, `single-${t}.yaml`), "--out", path.join(base, `single-${t}`), "-q", "--threads", "1"], sink())).toBe(0);
    }
  });
  afterAll(() => rmSync(base, { recursive: true, force: true }));

  for (const t of thresholds) {
    it(`threshold ${t}: components and p_fwe equal the single run's`, () => {
      const swept = readFileSync(path.join(base, "sweep", "up", `threshold-${t}`, "components.tsv"), "utf8");
      const single = readFileSync(path.join(base, `single-${t}`, "up", "components.tsv"), "utf8");
      expect(swept).toBe(single);
    });

    it(`threshold ${t}: the sweep's null columns equal the single run's max_extent and max_mass`, () => {
      const sweepNull = parseTsv(readFileSync(path.join(base, "sweep", "up", "null.tsv"), "utf8"), "sweep");
      const singleNull = parseTsv(readFileSync(path.join(base, `single-${t}`, "up", "null.tsv"), "utf8"), "single");
      const extentColumn = t === thresholds[0] ? "max_extent" : `max_extent_t${t}`;
      const massColumn = t === thresholds[0] ? "max_mass" : `max_mass_t${t}`;
      const pick = (table: typeof sweepNull, name: string) => table.rows.map((row) => row[table.header.indexOf(name)]);
      expect(pick(sweepNull, extentColumn)).toEqual(pick(singleNull, "max_extent"));
      expect(pick(sweepNull, massColumn)).toEqual(pick(singleNull, "max_mass"));
    });
  }

  it("writes a robustness table naming, per threshold, the significant component holding each edge", () => {
    const table = parseTsv(readFileSync(path.join(base, "sweep", "up", "threshold_robustness.tsv"), "utf8"), "robustness");
    expect(table.header).toEqual(["region_a", "region_b", "statistic", "component_t2.5", "component_t3", "component_t3.5", "significant_thresholds"]);
    for (const row of table.rows) {
      const count = row.slice(3, 6).filter((cell) => cell !== "").length;
      expect(Number(row[6])).toBe(count);
      expect(count).toBeGreaterThan(0);
    }
  });
});
