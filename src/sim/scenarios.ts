/**
 * Built-in invented scenarios: treadmill walking and running with a calf muscle working on the human
 * plateau and shallow ascending limb, and a thigh muscle that reaches the descending limb. The shapes
 * are made up for demos and tests (smooth, a few harmonics); they are not measurements of anyone.
 */
import type { Side } from '../trial/records.ts';
import type { HeaderSpec, MuscleSpec, Scenario, StrideVariation, TrialSpec } from './gait-generator.ts';
import type { TrajectorySpec } from './trajectory.ts';

interface MuscleTemplate {
  readonly defaultName: string;
  readonly side: Side;
  readonly sarcomeresInSeries: number;
  readonly thicknessMm: number;
  readonly noiseSdMm: number;
  readonly walk: TrajectorySpec;
  readonly run: TrajectorySpec;
}

/** Phase 0 is the muscle's own foot strike; walking toe-off at 0.62, running toe-off at 0.38. */
const TEMPLATES: readonly MuscleTemplate[] = [
  {
    defaultName: 'calf',
    side: 'left',
    sarcomeresInSeries: 17_500,
    thicknessMm: 17,
    noiseSdMm: 0.25,
    // Lengthening through early stance to a peak in mid stance, shortening from push-off through swing.
    walk: {
      minUm: 2.3,
      maxUm: 2.9,
      harmonics: [
        { amplitude: 1, peakPhase: 0.4 },
        { amplitude: 0.35, peakPhase: 0.3 },
        { amplitude: 0.1, peakPhase: 0.15 },
      ],
    },
    run: {
      minUm: 2.25,
      maxUm: 2.85,
      harmonics: [
        { amplitude: 1, peakPhase: 0.22 },
        { amplitude: 0.3, peakPhase: 0.15 },
        { amplitude: 0.08, peakPhase: 0.05 },
      ],
    },
  },
  {
    defaultName: 'thigh',
    side: 'right',
    sarcomeresInSeries: 30_000,
    thicknessMm: 24,
    noiseSdMm: 0.4,
    // A stretch in early stance, shortening in mid stance, the longest lengths in early swing.
    walk: {
      minUm: 2.55,
      maxUm: 3.2,
      harmonics: [
        { amplitude: 1, peakPhase: 0.7 },
        { amplitude: 0.45, peakPhase: 0.12 },
        { amplitude: 0.12, peakPhase: 0.45 },
      ],
    },
    run: {
      minUm: 2.5,
      maxUm: 3.35,
      harmonics: [
        { amplitude: 1, peakPhase: 0.72 },
        { amplitude: 0.4, peakPhase: 0.15 },
        { amplitude: 0.1, peakPhase: 0.4 },
      ],
    },
  },
];

interface GaitTemplate {
  readonly strideS: number;
  readonly stanceFraction: number;
  readonly variation: StrideVariation;
}

const GAIT: Readonly<Record<Scenario, GaitTemplate>> = {
  walk: { strideS: 1.1, stanceFraction: 0.62, variation: { periodCv: 0.02, amplitudeCv: 0.03, offsetSdUm: 0.01 } },
  run: { strideS: 0.72, stanceFraction: 0.38, variation: { periodCv: 0.015, amplitudeCv: 0.03, offsetSdUm: 0.01 } },
};

export interface ScenarioOptions {
  /** @default 1 */
  readonly seed?: number;
  /** @default 100 */
  readonly rateHz?: number;
  /** @default 60 (walk), 20 (run) */
  readonly durationS?: number;
  /** @default 0 */
  readonly startS?: number;
  /** Muscle names; the first gets the calf profile, the second the thigh profile, then they repeat on the other side. @default ['calf', 'thigh'] */
  readonly muscles?: readonly string[];
  /** @default { calibrate: 'all' } */
  readonly header?: HeaderSpec | null;
}

const OTHER_SIDE: Readonly<Record<Side, Side>> = { left: 'right', right: 'left' };

/** The muscles of a scenario for the given names. */
export function scenarioMuscles(scenario: Scenario, names: readonly string[]): MuscleSpec[] {
  return names.map((name, i) => {
    const tpl = TEMPLATES[i % TEMPLATES.length] as MuscleTemplate;
    const side = Math.floor(i / TEMPLATES.length) % 2 === 0 ? tpl.side : OTHER_SIDE[tpl.side];
    return {
      name,
      side,
      sarcomeresInSeries: tpl.sarcomeresInSeries,
      trajectory: tpl[scenario],
      thicknessMm: tpl.thicknessMm,
      noiseSdMm: tpl.noiseSdMm,
      pennationSdDeg: 0.3,
    };
  });
}

export const DEFAULT_MUSCLES: readonly string[] = TEMPLATES.map((t) => t.defaultName);

/** A clean trial of a scenario (no dropouts, bad lines or markers); add those with object spread. */
export function scenarioSpec(scenario: Scenario, options: ScenarioOptions = {}): TrialSpec {
  const gait = GAIT[scenario];
  return {
    scenario,
    seed: options.seed ?? 1,
    rateHz: options.rateHz ?? 100,
    startS: options.startS ?? 0,
    durationS: options.durationS ?? (scenario === 'walk' ? 60 : 20),
    strideS: gait.strideS,
    stanceFraction: gait.stanceFraction,
    initialPhase: 0.7,
    strideVariation: gait.variation,
    muscles: scenarioMuscles(scenario, options.muscles ?? DEFAULT_MUSCLES),
    dropouts: [],
    badLines: [],
    markers: [],
    header: options.header === undefined ? { calibrate: 'all' } : options.header,
    // Above the 1 MiB line cap of the file reader and the message cap of live input.
    longLineChars: 1024 * 1024 + 1024,
  };
}
