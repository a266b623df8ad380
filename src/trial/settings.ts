/**
 * Settings of a trial, each with its default said once here (a settings file will expose them): the
 * bounds a trial is held to whatever its input claims (every buffer of the pipeline is bounded by one
 * of these or by a window of time, never by the span of time a sample claims), and how a live session
 * takes a device's clock.
 */

/**
 * Most distinct muscles one trial may carry, and one live device: a sample naming a further muscle (or a
 * header declaring more) is rejected as `too_many_muscles`. Each muscle holds some hundreds of kilobytes
 * of histograms and filters, so this bounds a trial's memory.
 */
export const MAX_MUSCLES_PER_TRIAL = 64;

/**
 * Most frames a stage may hold back while it waits to decide something (a muscle's baseline window, its
 * stride-period window). When that many wait, the stage decides from what it holds and lets them go.
 */
export const MAX_HELD_FRAMES = 200_000;

/**
 * A live connection that starts with a header and then times more than this much earlier than the
 * session has seen from that device is a device whose clock restarted: its times go on from the
 * session's timeline with an offset. A smaller step back is taken for records sent again after a
 * reconnection (rejected as duplicates or as going back in time), seconds.
 */
export const CLOCK_RESET_MIN_S = 1;
