/** The sizes the adapters hold their input to, said once for files and sockets alike. */

/** Longest line of a file and longest live message, in bytes (1 MiB): longer ones are refused, never held whole. */
export const MAX_LINE_BYTES = 1024 * 1024;

/** A rejection keeps at most this many characters of the input it refuses. */
export const EXCERPT_CHARS = 200;

/** Bytes decoded for an excerpt: enough for EXCERPT_CHARS characters of up to 4 UTF-8 bytes each. */
export const EXCERPT_BYTES = EXCERPT_CHARS * 4;

/**
 * Frames of one recording of a trial description that may wait to be merged in time order before its
 * reading pauses: with one read chunk more (RECORDING_CHUNK_BYTES), what a recording holds whatever its
 * clock claims. Small on purpose: frames that wait across reads outlive the young generation's
 * collections and are collected late, so the more wait, the more memory the process takes (at 16 384
 * and 256 KiB chunks, a 1- to 4-hour pair of tables took 1.3 to 2 times the memory of the same trial in
 * one table; at 1 024 and 32 KiB, the same as it: bench/README.md, "A trial description").
 */
export const MERGE_READ_AHEAD_FRAMES = 1024;

/** Bytes a trial description's recording is read at a time (a trial file is read 256 KiB at a time). */
export const RECORDING_CHUNK_BYTES = 32 * 1024;
