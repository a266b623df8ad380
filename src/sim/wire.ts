/**
 * Records of the lengthwise-stream format (version 1) in wire form: plain JSON-able objects exactly as
 * a device writes them. The generator yields these, plus raw strings for deliberately bad lines.
 */
import type { GaitEventName, Side } from '../trial/records.ts';

export const STREAM_FORMAT = 'lengthwise-stream';
export const STREAM_VERSION = 1;

export interface WireMuscleCalibration {
  readonly species: 'human';
  readonly method: 'sarcomere_count';
  readonly sarcomeres_in_series: number;
}

export interface WireHeader {
  readonly format: typeof STREAM_FORMAT;
  readonly version: typeof STREAM_VERSION;
  readonly subject?: string;
  readonly trial?: string;
  readonly rate_hz?: number;
  readonly muscles?: Readonly<Record<string, { readonly side?: Side }>>;
  readonly calibration?: { readonly muscles: Readonly<Record<string, WireMuscleCalibration>> };
}

export interface WireSample {
  readonly t: number;
  readonly muscle: string;
  readonly fascicle_mm: number;
  readonly pennation_deg?: number;
  readonly quality?: number;
}

export interface WireEvent {
  readonly t: number;
  readonly event: GaitEventName;
  readonly side: Side;
}

export interface WireMarker {
  readonly t: number;
  readonly marker: string;
}

export type WireRecord = WireHeader | WireSample | WireEvent | WireMarker;

/** What a generator yields: a record, or a raw line that is deliberately not a valid record. */
export type WireItem = WireRecord | string;

export function isWireHeader(r: WireRecord): r is WireHeader {
  return 'format' in r;
}

export function isWireSample(r: WireRecord): r is WireSample {
  return 'fascicle_mm' in r;
}

export function isWireEvent(r: WireRecord): r is WireEvent {
  return 'event' in r;
}

export function isWireMarker(r: WireRecord): r is WireMarker {
  return 'marker' in r;
}
