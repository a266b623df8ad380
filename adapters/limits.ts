/** The sizes the adapters hold their input to, said once for files and sockets alike. */

/** Longest line of a file and longest live message, in bytes (1 MiB): longer ones are refused, never held whole. */
export const MAX_LINE_BYTES = 1024 * 1024;

/** A rejection keeps at most this many characters of the input it refuses. */
export const EXCERPT_CHARS = 200;

/** Bytes decoded for an excerpt: enough for EXCERPT_CHARS characters of up to 4 UTF-8 bytes each. */
export const EXCERPT_BYTES = EXCERPT_CHARS * 4;

/**
 * Frames of one recording of a trial description that may wait to be merged in time order before its
 * reading pauses: with one read chunk more, what a recording holds whatever its clock claims.
 */
export const MERGE_READ_AHEAD_FRAMES = 16_384;
