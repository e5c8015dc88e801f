import type { Region } from "../io/regions.js";
import { normalSource } from "./normalSource.js";

/** Invented system names; deliberately not the names of any real brain network. */
export const SYSTEM_NAMES = ["amber", "cobalt", "jade", "ochre", "slate", "coral", "indigo", "russet"] as const;

/** Invented label stems, one per system; landscape words, not anatomical names. */
const LABEL_STEMS = ["ridge", "vale", "knoll", "cove", "mesa", "spur", "ledge", "brook"] as const;

/** Semi-axes (mm) of the invented ellipsoid the regions sit inside: lateral, front–back, up–down. */
const SEMI_AXES_MM = { x: 68, y: 100, z: 78 } as const;
/** Offsets (mm) of the ellipsoid's centre from the origin. */
const CENTRE_MM = { y: -15, z: 10 } as const;

export interface RegionLayout {
  regions: Region[];
  /** System index of each region (into SYSTEM_NAMES). */
  system: Int32Array;
  /** Index of the mirror-image region in the other hemisphere, or -1. */
  homologue: Int32Array;
  /** Coordinates (mm) as written to regions.tsv, row-major N × 3. */
  coordinates: Float64Array;
}

function roundTenth(value: number): number {
  const rounded = Math.round(value * 10) / 10;
  return rounded === 0 ? 0 : rounded;
}

/**
 * Lays out N invented regions: floor(N/2) left/right homologous pairs (an odd
 * region out goes to the left), grouped into systems of about ten regions,
 * each system a patch on an invented ellipsoid. Left regions come first, then
 * right, each hemisphere ordered by system. Labels read `L-ridge-03`: the
 * hemisphere, the system's stem, and the region's number within the system.
 */
export function regionLayout(regionCount: number, random: () => number): RegionLayout {
  const normal = normalSource(random);
  const pairCount = Math.floor(regionCount / 2);
  const hasUnpaired = regionCount % 2 === 1;
  const slots = pairCount + (hasUnpaired ? 1 : 0);
  const systemCount = Math.max(1, Math.min(SYSTEM_NAMES.length, Math.round(regionCount / 10), slots));

  // Slot k (a homologous pair, or the unpaired region last) belongs to system floor(k·S/slots).
  const slotSystem = new Int32Array(slots);
  for (let k = 0; k < slots; k++) slotSystem[k] = Math.floor((k * systemCount) / slots);

  // Right-hemisphere point for each slot: a jittered direction around its system's centre.
  const slotPoint: Array<[number, number, number]> = [];
  for (let k = 0; k < slots; k++) {
    const s = slotSystem[k];
    const yaw = ((-80 + (160 * (s + 0.5)) / systemCount) * Math.PI) / 180;
    const pitch = ((s % 2 === 0 ? 25 : -15) * Math.PI) / 180;
    let ux = Math.cos(pitch) * Math.cos(yaw) + 0.25 * normal();
    let uy = Math.cos(pitch) * Math.sin(yaw) + 0.25 * normal();
    let uz = Math.sin(pitch) + 0.25 * normal();
    ux = Math.max(0.15, Math.abs(ux));
    const length = Math.hypot(ux, uy, uz);
    ux /= length;
    uy /= length;
    uz /= length;
    const depth = 0.75 + 0.2 * random();
    slotPoint.push([
      SEMI_AXES_MM.x * depth * ux,
      SEMI_AXES_MM.y * depth * uy + CENTRE_MM.y,
      SEMI_AXES_MM.z * depth * uz + CENTRE_MM.z,
    ]);
  }

  // Region order: left slots (pairs then the unpaired one), then right slots (pairs).
  const leftCount = slots;
  const regions: Region[] = [];
  const system = new Int32Array(regionCount);
  const homologue = new Int32Array(regionCount).fill(-1);
  const coordinates = new Float64Array(regionCount * 3);
  const numberInSystem = new Int32Array(systemCount);
  const slotNumber = new Int32Array(slots);
  for (let k = 0; k < slots; k++) slotNumber[k] = ++numberInSystem[slotSystem[k]];

  const place = (index: number, k: number, side: "left" | "right") => {
    const [px, py, pz] = slotPoint[k];
    let x: number;
    let y = py;
    let z = pz;
    if (side === "left") {
      // Homologues are near mirror images, not exact ones.
      x = -Math.max(5, Math.abs(px + 2 * normal()));
      y += 2 * normal();
      z += 2 * normal();
    } else {
      x = Math.max(5, px);
    }
    const s = slotSystem[k];
    const label = `${side === "left" ? "L" : "R"}-${LABEL_STEMS[s]}-${String(slotNumber[k]).padStart(2, "0")}`;
    const region: Region = {
      label,
      x: roundTenth(x),
      y: roundTenth(y),
      z: roundTenth(z),
      hemisphere: side,
      system: SYSTEM_NAMES[s],
    };
    regions[index] = region;
    system[index] = s;
    coordinates[3 * index] = region.x as number;
    coordinates[3 * index + 1] = region.y as number;
    coordinates[3 * index + 2] = region.z as number;
  };

  for (let k = 0; k < slots; k++) place(k, k, "left");
  for (let k = 0; k < pairCount; k++) {
    const right = leftCount + k;
    place(right, k, "right");
    homologue[k] = right;
    homologue[right] = k;
  }
  return { regions, system, homologue, coordinates };
}

/** Euclidean distance (mm) between regions i and j of a layout. */
export function regionDistance(layout: RegionLayout, i: number, j: number): number {
  const c = layout.coordinates;
  return Math.hypot(c[3 * i] - c[3 * j], c[3 * i + 1] - c[3 * j + 1], c[3 * i + 2] - c[3 * j + 2]);
}
