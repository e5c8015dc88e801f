import { SUBJECT_BLOCK_SIZE } from "./connectomeEdges.js";

/** The blocks of SUBJECT_BLOCK_SIZE consecutive subjects that the loaders hand out (matrixBlocks.ts). */
export function blockCount(subjects: number): number {
  return Math.ceil(subjects / SUBJECT_BLOCK_SIZE);
}

/** Subjects first … end − 1 of `block`. */
export function blockSubjects(block: number, subjects: number): { first: number; end: number } {
  const first = block * SUBJECT_BLOCK_SIZE;
  return { first, end: Math.min(subjects, first + SUBJECT_BLOCK_SIZE) };
}
