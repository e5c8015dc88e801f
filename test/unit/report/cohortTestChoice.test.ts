import { describe as group, expect, it } from "vitest";
import { categoricalTest, numericTest } from "../../../src/output/report/cohortTable.js";
import { expectClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

// Which test the cohort table runs for a variable, and that it passes the test's p-value through.
// Reference: test/fixtures/r/report_cohort.json, written by test/fixtures/r/report_cohort.R
// (base R's t.test, oneway.test, chisq.test, fisher.test; see that script's header).
interface CohortFixture {
  welch_t: { x: number[]; y: number[]; p_value: number }[];
  welch_anova: { groups: number[][]; p_value: number }[];
  chi_square: { name: string; counts: number[][]; p_value: number }[];
  fisher: { name: string; counts: number[][]; p_value: number }[];
}

const fixture = loadFixture<CohortFixture>("r/report_cohort.json");

// p-values go through continued fractions (incomplete beta and gamma), so 1e-12 relative
// (R's own pt/pchisq are accurate to about that).
const TAIL = 1e-12;

group("choosing the cohort-table test", () => {
  it("a 2 × 2 table with an expected count below 5 gets Fisher's exact test (R fisher.test p)", () => {
    const c = fixture.fisher.find((f) => f.name === "small_group")!;
    const test = categoricalTest(c.counts);
    expect(test.test).toBe("fisher-exact");
    expectClose(test.pValue, c.p_value, { rel: 1e-12, label: "small_group via categoricalTest vs R fisher.test" });
  });

  it("a larger table with small expected counts keeps chi-square and is flagged (R chisq.test p)", () => {
    const c = fixture.chi_square.find((f) => f.name === "small_expected")!;
    const test = categoricalTest(c.counts);
    expect(test.test).toBe("chi-square");
    expect(test.smallExpected).toBe(true);
    expectClose(test.pValue, c.p_value, { rel: TAIL, label: "small_expected via categoricalTest vs R chisq.test" });
  });

  it("an empty level row is dropped before testing: same p as R on the table without it", () => {
    const c = fixture.chi_square.find((f) => f.name === "site_by_group")!;
    const withEmpty = [...c.counts.slice(0, 1), [0, 0], ...c.counts.slice(1)];
    expectClose(categoricalTest(withEmpty).pValue, c.p_value, { rel: TAIL, label: "empty row dropped vs R chisq.test" });
  });

  it("two groups of numbers get Welch's t-test, three or more Welch's ANOVA (R t.test, oneway.test)", () => {
    const t = fixture.welch_t[0];
    expect(numericTest([t.x, t.y]).test).toBe("welch-t");
    expectClose(numericTest([t.x, t.y]).pValue, t.p_value, { rel: TAIL, label: "numericTest two groups vs R t.test" });
    const f = fixture.welch_anova[0];
    expect(numericTest(f.groups).test).toBe("welch-anova");
    expectClose(numericTest(f.groups).pValue, f.p_value, { rel: TAIL, label: "numericTest three groups vs R oneway.test" });
  });
});
