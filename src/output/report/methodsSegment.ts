/**
 * A piece of the methods text: plexus's own words (a string), or text from the
 * user's files (`user`: formula, column names, contrast names and expressions,
 * levels), kept apart so each writer can quote it safely (a Markdown code span,
 * an HTML <code>).
 */
export type Segment = string | { user: string };
