/** Why a line or message was rejected. Codes are stable: they appear in summaries and session logs. */
export const REJECT_REASONS = [
  'not_json',
  'schema',
  'out_of_range',
  'time_not_increasing',
  'duplicate',
  'line_too_long',
  'unknown_event',
  'unsafe_key',
  'too_deep',
  'too_many_muscles',
] as const;

export type RejectReason = (typeof REJECT_REASONS)[number];

/** One line each, said once here: what the reason means for a person reading a count. */
export const REASON_TEXT: Readonly<Record<RejectReason, string>> = {
  not_json: 'not valid JSON (or not a CSV row of the expected columns)',
  schema: 'valid JSON, but not a sample, gait event, marker or header of the lengthwise-stream format',
  out_of_range: 'a value outside what is physically possible (fascicle ≤ 0, pennation outside 0–90°, quality outside 0–1, time not finite)',
  time_not_increasing: "a sample earlier than the previous sample of the same muscle",
  duplicate: 'a sample at exactly the time of the previous sample of the same muscle',
  line_too_long: 'a line or message longer than the length cap',
  unknown_event: 'a gait event other than foot_strike or toe_off',
  unsafe_key: 'a key such as __proto__ or constructor that could alter objects',
  too_deep: 'nesting deeper than any record of the format needs',
  too_many_muscles: 'a sample of a muscle beyond the most one trial (or one live device) may carry, or a header declaring more',
};
