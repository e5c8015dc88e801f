/** Site names of the invented multi-site study. */
export const SITE_NAMES = ["north", "central", "south"] as const;

/** Range of the invented word-list recall score (higher is better recall). */
export const RECALL_SCORE_RANGE = { min: 0, max: 15 } as const;

export type Group = "control" | "patient";

export interface DrawnParticipants {
  ids: string[];
  group: Group[];
  /** Age in whole years, 55–85. */
  age: Int32Array;
  sex: Array<"F" | "M">;
  /** Latent severity, standard normal; it drives the recall score and, in patients, the planted effect. */
  severity: Float64Array;
  /** Word-list recall score, integer 0–15, falling with severity; meaningful for patients only. */
  recallScore: Int32Array;
  /** Index into SITE_NAMES. */
  site: Int32Array;
}

/**
 * Draws the invented participants: BIDS-style ids sub-001…, group labels
 * shuffled over the ids (Fisher–Yates; Durstenfeld 1964, CACM 7(7):420), ages
 * round(70 + 7z) clipped to 55–85, 55 % women, a latent severity z and a recall
 * score round(9 − 2.5·severity + z′) clipped to 0–15. Sites rotate within each
 * group in id order, so every site holds both groups. The number of uniform
 * draws depends only on the group sizes, never on the effect.
 */
export function drawParticipants(
  patients: number,
  controls: number,
  random: () => number,
  normal: () => number,
): DrawnParticipants {
  const total = patients + controls;
  const width = Math.max(3, String(total).length);
  const ids = Array.from({ length: total }, (_, k) => `sub-${String(k + 1).padStart(width, "0")}`);

  const group: Group[] = [
    ...Array<Group>(controls).fill("control"),
    ...Array<Group>(patients).fill("patient"),
  ];
  for (let k = total - 1; k > 0; k--) {
    const swap = Math.floor(random() * (k + 1));
    [group[k], group[swap]] = [group[swap], group[k]];
  }

  const age = new Int32Array(total);
  const sex: Array<"F" | "M"> = [];
  const severity = new Float64Array(total);
  const recallScore = new Int32Array(total);
  const site = new Int32Array(total);
  const seenInGroup = { control: 0, patient: 0 };
  for (let k = 0; k < total; k++) {
    age[k] = Math.min(85, Math.max(55, Math.round(70 + 7 * normal())));
    sex.push(random() < 0.55 ? "F" : "M");
    severity[k] = normal();
    const score = Math.round(9 - 2.5 * severity[k] + normal());
    recallScore[k] = Math.min(RECALL_SCORE_RANGE.max, Math.max(RECALL_SCORE_RANGE.min, score));
    site[k] = seenInGroup[group[k]]++ % SITE_NAMES.length;
  }
  return { ids, group, age, sex, severity, recallScore, site };
}
