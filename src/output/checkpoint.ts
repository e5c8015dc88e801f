import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { sha256Text } from "../common/sha256.js";
import { InputError } from "../errors.js";
import { writeAtomically } from "../common/writeAtomically.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";

/**
 * The null distribution saved chunk by chunk beside the results folder, so
 * an interrupted run (even kill -9) can continue with `--resume` and end with
 * exactly the results of an uninterrupted run. Each chunk file is written to
 * a temporary name and renamed (atomic on one file system) and carries a
 * SHA-256 of its rows; the manifest's fingerprint ties the checkpoint to the
 * design, the inputs' hashes, the seed and the plan.
 */
export class Checkpoint {
  private constructor(
    readonly folder: string,
    readonly fingerprint: string,
  ) {}

  static folderFor(outputFolder: string): string {
    const resolved = path.resolve(outputFolder);
    return path.join(path.dirname(resolved), `.${path.basename(resolved)}.plexus-checkpoint`);
  }

  static exists(outputFolder: string): boolean {
    return existsSync(path.join(Checkpoint.folderFor(outputFolder), "manifest.json"));
  }

  /** Starts a new checkpoint, removing any earlier one. */
  static create(outputFolder: string, fingerprint: string): Checkpoint {
    const folder = Checkpoint.folderFor(outputFolder);
    rmSync(folder, { recursive: true, force: true });
    mkdirSync(folder, { recursive: true });
    writeAtomically(path.join(folder, "manifest.json"), `${JSON.stringify({ fingerprint }, null, 2)}\n`);
    return new Checkpoint(folder, fingerprint);
  }

  /** True when the checkpoint of this output holds at least one finished chunk. */
  static holdsChunks(outputFolder: string): boolean {
    const folder = Checkpoint.folderFor(outputFolder);
    try {
      return readdirSync(folder).some(isChunkFile);
    } catch {
      return false;
    }
  }

  /**
   * Opens an earlier checkpoint for --resume; refuses one made for other
   * inputs or options (or damaged) when it holds finished chunks, and
   * replaces it when it holds none (nothing would be lost).
   */
  static resume(outputFolder: string, fingerprint: string): Checkpoint {
    const folder = Checkpoint.folderFor(outputFolder);
    const manifestPath = path.join(folder, "manifest.json");
    if (!existsSync(manifestPath) || !Checkpoint.holdsChunks(outputFolder)) return Checkpoint.create(outputFolder, fingerprint);
    let recorded: unknown;
    try {
      recorded = JSON.parse(readFileSync(manifestPath, "utf8")).fingerprint;
    } catch {
      throw new InputError("the checkpoint's manifest is damaged", { file: manifestPath }, START_OVER);
    }
    if (recorded !== fingerprint) {
      throw new InputError(
        "the checkpoint was made for a different design, inputs, seed or options",
        { file: manifestPath },
        `${START_OVER}, or restore the original inputs and options`,
      );
    }
    return new Checkpoint(folder, fingerprint);
  }

  /** True when at least one chunk has been saved. */
  hasChunks(): boolean {
    try {
      return readdirSync(this.folder).some(isChunkFile);
    } catch {
      return false;
    }
  }

  private chunkPath(contrast: string, from: number, to: number): string {
    return path.join(this.folder, `${contrast}.${from}-${to}.json`);
  }

  save(contrast: string, chunk: NullChunk): void {
    const rows = {
      from: chunk.from,
      to: chunk.to,
      maxExtent: Array.from(chunk.maxExtent),
      maxMass: Array.from(chunk.maxMass),
      maxStatistic: Array.from(chunk.maxStatistic, (v) => (Number.isNaN(v) ? "NaN" : v)),
      extraNames: chunk.extraNames,
      extra: chunk.extra.map((values) => Array.from(values, (v) => (Number.isNaN(v) ? "NaN" : v))),
    };
    const body = JSON.stringify(rows);
    const record = { sha256: sha256Text(body), rows: body };
    writeAtomically(this.chunkPath(contrast, chunk.from, chunk.to), JSON.stringify(record));
  }

  /** The saved chunks of a contrast, keyed by first k; a damaged chunk is refused. */
  load(contrast: string): Map<number, NullChunk> {
    const out = new Map<number, NullChunk>();
    const prefix = `${contrast}.`;
    for (const name of readdirSync(this.folder)) {
      if (!name.startsWith(prefix) || !name.endsWith(".json") || !/^\d+-\d+\.json$/.test(name.slice(prefix.length))) continue;
      const file = path.join(this.folder, name);
      let chunk: NullChunk;
      try {
        const record = JSON.parse(readFileSync(file, "utf8")) as { sha256: string; rows: string };
        if (sha256Text(record.rows) !== record.sha256) throw new Error("checksum mismatch");
        const rows = JSON.parse(record.rows) as {
          from: number;
          to: number;
          maxExtent: number[];
          maxMass: number[];
          maxStatistic: (number | string)[];
          extraNames?: string[];
          extra?: (number | string)[][];
        };
        chunk = {
          from: rows.from,
          to: rows.to,
          maxExtent: Float64Array.from(rows.maxExtent),
          maxMass: Float64Array.from(rows.maxMass),
          maxStatistic: Float64Array.from(rows.maxStatistic, (v) => (v === "NaN" ? NaN : Number(v))),
          extraNames: rows.extraNames ?? [],
          extra: (rows.extra ?? []).map((values) => Float64Array.from(values, (v) => (v === "NaN" ? NaN : Number(v)))),
        };
        if (chunk.maxExtent.length !== chunk.to - chunk.from) throw new Error("wrong length");
      } catch (error) {
        throw new InputError(
          `a checkpoint chunk is damaged (${(error as Error).message})`,
          { file },
          START_OVER,
        );
      }
      out.set(chunk.from, chunk);
    }
    return out;
  }

  remove(): void {
    rmSync(this.folder, { recursive: true, force: true });
  }
}

/** The advice when a checkpoint cannot be resumed: the one way to start over, which never sends the user back here. */
const START_OVER = "run without --resume and with --force to start over (the checkpoint is replaced)";

/** `<contrast>.<from>-<to>.json`, as `save` names a chunk. */
function isChunkFile(name: string): boolean {
  return /\.\d+-\d+\.json$/.test(name);
}
