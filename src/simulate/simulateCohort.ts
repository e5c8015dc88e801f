import { edgeCountFor, edgeIndexOf } from "../edges/edgeIndex.js";
import type { Region } from "../io/regions.js";
import { drawParticipants, SITE_NAMES } from "./drawParticipants.js";
import { COUNT_SCALE, CORRELATION_SCALE, groupTemplate, residualSd } from "./groupTemplate.js";
import { normalSource } from "./normalSource.js";
import { cliqueEdges, plantedRegions } from "./plantedSubnetwork.js";
import { regionLayout } from "./regionLayout.js";

export interface SimulationOptions {
  /** Number of regions N. */
  regions: number;
  patients: number;
  controls: number;
  /**
   * `correlation`: resting-state-like correlation matrices (|r| < 1, diagonal 1),
   * made in Fisher z space and mapped back with tanh, rounded to 6 decimals.
   * `counts`: tractography-like streamline counts (non-negative integers,
   * diagonal 0, many edges absent in everyone), made on the log1p scale.
   */
  kind: "correlation" | "counts";
  /**
   * A planted subnetwork: every edge among `regions` neighbouring regions, on
   * which patients differ from controls by Cohen's d = `size` on the model
   * scale (Fisher z or log1p count); positive means patients are higher.
   * Null for no effect.
   */
  effect: { regions: number; size: number } | null;
  /** Adds age, sex, recall_score (patients only) and site columns, with age and site effects on the edges. */
  covariates: boolean;
  /** Change per year of age, on the model scale, of every edge (centred at 70); defaults to a small decline. */
  ageEffect?: number;
}

export interface SimulatedCohort {
  /** BIDS-style participants table: participant_id, group, then age, sex, recall_score, site when covariates are on. */
  participants: { header: string[]; rows: string[][] };
  regions: Region[];
  /** One N × N row-major symmetric matrix per participant row. */
  matrices: Float64Array[];
  /** Region index pairs (i < j) of the planted effect, in edge order; empty if none. */
  plantedEdges: Array<[number, number]>;
}

/**
 * How much a patient's planted edges follow their latent severity: a patient's
 * shift is Δ + sign(d)·γ·σ·severity, so more severe patients (lower
 * recall_score) show a larger effect. γ = 0.75.
 */
export const SEVERITY_COUPLING = 0.75;

/** Largest |r| written, so rounding to 6 decimals never reaches ±1. */
const MAX_ABS_CORRELATION = 0.999999;

function roundCorrelation(z: number): number {
  const r = Math.round(Math.tanh(z) * 1e6) / 1e6;
  return Math.max(-MAX_ABS_CORRELATION, Math.min(MAX_ABS_CORRELATION, r)) + 0;
}

/**
 * Simulates a case–control cohort of connectivity matrices. Each subject's
 * edge on the model scale is
 *   group mean (systems, homologues, distance falloff; see groupTemplate)
 *   + subject offset + edge noise          (SD σ together; see residualSd)
 *   + site offset + age effect · (age − 70)  (only when covariates are on)
 *   + planted shift                          (patients, planted edges only).
 * Correlations live on the Fisher z = atanh(r) scale (Fisher 1915, Biometrika
 * 10(4):507–521). Cohen's d (Cohen 1988, Statistical Power Analysis for the
 * Behavioral Sciences, 2nd ed.) uses the pooled SD √((σ_c² + σ_p²)/2), where patients'
 * planted edges have SD σ√(1 + γ²) from the severity coupling, so the mean
 * shift is Δ = d·σ·√(1 + γ²/2). Effects and covariates never change which
 * random numbers the rest of the cohort draws, so the same seed with and
 * without an effect gives the same noise. Matrices are not forced to be
 * positive semidefinite. Pure: all randomness comes from `random`.
 */
export function simulateCohort(options: SimulationOptions, random: () => number): SimulatedCohort {
  const regionCount = options.regions;
  const edgeCount = edgeCountFor(regionCount);
  const scale = options.kind === "correlation" ? CORRELATION_SCALE : COUNT_SCALE;
  const normal = normalSource(random);

  const layout = regionLayout(regionCount, random);

  const seedDraw = random();
  const plantedEdges = options.effect
    ? cliqueEdges(plantedRegions(layout, Math.max(2, Math.min(regionCount, options.effect.regions)), seedDraw))
    : [];
  const planted = new Uint8Array(edgeCount);
  for (const [i, j] of plantedEdges) planted[edgeIndexOf(regionCount, i, j)] = 1;

  const template = groupTemplate(layout, options.kind, planted, random, normal);
  const people = drawParticipants(options.patients, options.controls, random, normal);

  const siteOffset = Array.from({ length: SITE_NAMES.length }, () => {
    const offset = new Float64Array(edgeCount);
    for (let e = 0; e < edgeCount; e++) offset[e] = scale.siteNoise * normal();
    return offset;
  });

  const sigma = residualSd(scale);
  const size = options.effect ? options.effect.size : 0;
  const shift = size * sigma * Math.sqrt(1 + (SEVERITY_COUPLING * SEVERITY_COUPLING) / 2);
  const severitySlope = Math.sign(size) * SEVERITY_COUPLING * sigma;
  const ageEffect = options.ageEffect ?? scale.ageEffectPerYear;

  const matrices: Float64Array[] = [];
  const total = people.ids.length;
  for (let k = 0; k < total; k++) {
    const isPatient = people.group[k] === "patient";
    const subjectOffset = scale.globalNoise * normal();
    const nuisance = options.covariates ? ageEffect * (people.age[k] - 70) : 0;
    const site = siteOffset[people.site[k]];
    const plantedShift = isPatient ? shift + severitySlope * people.severity[k] : 0;
    const matrix = new Float64Array(regionCount * regionCount);
    let e = 0;
    for (let i = 0; i < regionCount; i++) {
      matrix[i * regionCount + i] = options.kind === "correlation" ? 1 : 0;
      for (let j = i + 1; j < regionCount; j++, e++) {
        let value = template.mean[e] + subjectOffset + scale.edgeNoise * normal() + nuisance;
        if (options.covariates) value += site[e];
        if (planted[e] === 1) value += plantedShift;
        const written =
          options.kind === "correlation"
            ? roundCorrelation(value)
            : template.present[e] === 1
              ? Math.max(0, Math.round(Math.expm1(value)))
              : 0;
        matrix[i * regionCount + j] = written;
        matrix[j * regionCount + i] = written;
      }
    }
    matrices.push(matrix);
  }

  const header = options.covariates
    ? ["participant_id", "group", "age", "sex", "recall_score", "site"]
    : ["participant_id", "group"];
  const rows = people.ids.map((id, k) =>
    options.covariates
      ? [
          id,
          people.group[k],
          String(people.age[k]),
          people.sex[k],
          people.group[k] === "patient" ? String(people.recallScore[k]) : "n/a",
          SITE_NAMES[people.site[k]],
        ]
      : [id, people.group[k]],
  );

  return { participants: { header, rows }, regions: layout.regions, matrices, plantedEdges };
}
