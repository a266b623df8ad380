/** A calibration's provenance in the calibration file's own key names; the summary and `calibrate` write it the same way. */
import type { CalibrationProvenance } from '../model/calibration.ts';

export interface ProvenanceJson {
  method?: string;
  source_file?: string;
  source_sha256?: string;
  windows_s?: [number, number][];
  sarcomere_lengths_um?: number[];
  sarcomere_length_source?: string;
  created_utc?: string;
  tool_version?: string;
}

export function provenanceJson(p: CalibrationProvenance): ProvenanceJson {
  return {
    ...(p.method !== undefined ? { method: p.method } : {}),
    ...(p.sourceFile !== undefined ? { source_file: p.sourceFile } : {}),
    ...(p.sourceSha256 !== undefined ? { source_sha256: p.sourceSha256 } : {}),
    ...(p.windowsS !== undefined ? { windows_s: p.windowsS.map(([a, b]): [number, number] => [a, b]) } : {}),
    ...(p.sarcomereLengthsUm !== undefined ? { sarcomere_lengths_um: [...p.sarcomereLengthsUm] } : {}),
    ...(p.sarcomereLengthSource !== undefined ? { sarcomere_length_source: p.sarcomereLengthSource } : {}),
    ...(p.createdUtc !== undefined ? { created_utc: p.createdUtc } : {}),
    ...(p.toolVersion !== undefined ? { tool_version: p.toolVersion } : {}),
  };
}
