import { describe, expect, it } from 'vitest';
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { BehaviorSubject } from 'rxjs';
import { TestScheduler } from 'rxjs/testing';
import { parseSpeed, speedOnceShown, type Speed } from '../../src/commands/replay.ts';
import { paceReplayWith } from '../../src/pipeline/pace-replay.ts';
import { makeSample } from '../../src/trial/records.ts';
import { runLengthwise } from '../helpers/command-child.ts';
import { deviceCopy, DEVICE_MAPPING as MAPPING } from '../helpers/device-copy.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');
const DEMO_CSV = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.csv');
const DEMO_CAL = join(import.meta.dirname, '..', '..', 'replays', 'demo-calibration.json');

async function tmp(): Promise<string> {
  return mkdtemp(join(tmpdir(), 'lengthwise-replay-'));
}

describe('lengthwise replay', () => {
  it('replays the demo as fast as possible and writes the summary and the stride table', async () => {
    const dir = await tmp();
    const summaryPath = join(dir, 'out', 'summary.json');
    const stridesPath = join(dir, 'out', 'strides.csv');
    const ran = await runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', summaryPath, '--strides', stridesPath]);
    expect(ran.stderr).toContain('summary written');
    expect(ran.code).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(summary).toMatchObject({ format: 'lengthwise-summary', version: 1, calibrated: true });
    // The demo's eleven bad lines, one or more of each kind (replays/README.md).
    expect(summary.frames.rejected).toBe(11);
    expect(summary.frames.rejected_by_reason).toMatchObject({
      not_json: 1,
      schema: 1,
      out_of_range: 3,
      time_not_increasing: 1,
      duplicate: 1,
      unknown_event: 1,
      unsafe_key: 1,
      too_deep: 1,
      line_too_long: 1,
    });
    expect(summary.frames.received).toBe(summary.frames.accepted + summary.frames.rejected + summary.frames.gait_events + summary.frames.markers + summary.frames.headers);
    expect(summary.frames.low_quality).toBeGreaterThan(0);
    for (const name of ['calf', 'thigh']) {
      const m = summary.muscles[name];
      expect(m.trial.stride_count).toBeGreaterThan(40);
      const sum = Object.values(m.trial.region_fraction as Record<string, number>).reduce((a, b) => a + b, 0);
      expect(sum).toBeCloseTo(1, 9);
    }
    const rows = (await readFile(stridesPath, 'utf8')).trimEnd().split('\r\n');
    const strideCount = summary.muscles.calf.strides.length + summary.muscles.thigh.strides.length;
    expect(rows).toHaveLength(1 + strideCount);
    expect(ran.stdout).toContain('calf');
  });

  it('gives the same figures for the CSV variant with a calibration file', async () => {
    const dir = await tmp();
    const a = join(dir, 'a.json');
    const b = join(dir, 'b.json');
    expect((await runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', a])).code).toBe(0);
    expect((await runLengthwise(['replay', DEMO_CSV, '--calibration', DEMO_CAL, '--speed', 'max', '--summary', b])).code).toBe(0);
    const ndjson = JSON.parse(await readFile(a, 'utf8'));
    const csv = JSON.parse(await readFile(b, 'utf8'));
    expect(csv.muscles.calf.trial.stride_count).toBe(ndjson.muscles.calf.trial.stride_count);
    expect(csv.muscles.calf.trial.sl_mean_um).toBeCloseTo(ndjson.muscles.calf.trial.sl_mean_um, 2);
  });

  it('gives the same summary twice for the same input, byte for byte but for the time it was made', async () => {
    const dir = await tmp();
    const a = join(dir, 'a.json');
    const b = join(dir, 'b.json');
    await runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', a]);
    await runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', b]);
    const made = /"created_utc": "[^"]*"/;
    const [x, y] = [await readFile(a, 'utf8'), await readFile(b, 'utf8')];
    expect(x).toMatch(made);
    expect(x.replace(made, '')).toBe(y.replace(made, ''));
  });

  it('says loudly when a trial has no calibration, and still runs', async () => {
    const dir = await tmp();
    const summaryPath = join(dir, 's.json');
    const ran = await runLengthwise(['replay', DEMO_CSV, '--speed', 'max', '--summary', summaryPath]);
    expect(ran.code).toBe(0);
    expect(ran.stdout).toContain('UNCALIBRATED');
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(summary.calibrated).toBe(false);
    expect(summary.muscles.calf.calibration_source).toBe('baseline');
  });

  it('names a missing file and exits 1 without a stack trace', async () => {
    const ran = await runLengthwise(['replay', '/nonexistent/trial.ndjson', '--speed', 'max']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain('/nonexistent/trial.ndjson');
    expect(ran.stderr).not.toMatch(/at .*\.ts:\d+/);
  });

  it('refuses a bad calibration file with what was wrong', async () => {
    const dir = await tmp();
    const cal = join(dir, 'cal.json');
    await writeFile(cal, JSON.stringify({ muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: -3 } } }));
    const ran = await runLengthwise(['replay', DEMO, '--calibration', cal]);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toContain('sarcomeres_in_series');
  });

  it('refuses a bad speed, and names the nearest option for an unknown one', async () => {
    expect((await runLengthwise(['replay', DEMO, '--speed', 'fast'])).stderr).toContain('positive number');
    const unknown = await runLengthwise(['replay', DEMO, '--sped', '2']);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain('`--sped`: unknown option; did you mean `--speed`?');
    expect(unknown.stderr).toContain('lengthwise replay --help lists every option');
  });

  it('takes a negative number for a value and says why it is refused', async () => {
    const negative = await runLengthwise(['replay', DEMO, '--speed', '-1']);
    expect(negative.code).toBe(2);
    expect(negative.stderr).toContain('--speed "-1" is not a speed');
  });
});

describe('lengthwise replay --mapping', () => {

  it('replays a file in a device\'s own names and units as the same trial in ours', async () => {
    const dir = await tmp();
    const files = await deviceCopy(DEMO, dir);
    const [a, b] = await Promise.all([
      runLengthwise(['replay', files.ours, '--speed', 'max', '--summary', join(dir, 'ours.json')]),
      runLengthwise(['replay', files.device, '--mapping', MAPPING, '--speed', 'max', '--summary', join(dir, 'device.json')]),
    ]);
    expect([a.code, b.code]).toEqual([0, 0]);
    const ours = JSON.parse(await readFile(join(dir, 'ours.json'), 'utf8'));
    const device = JSON.parse(await readFile(join(dir, 'device.json'), 'utf8'));
    expect(device.frames).toEqual(ours.frames);
    expect(device.frames.accepted).toBeGreaterThan(1000);
    for (const name of ['calf', 'thigh']) {
      const [x, y] = [ours.muscles[name].trial, device.muscles[name].trial];
      expect(y.stride_count).toBe(x.stride_count);
      expect(y.stride_count).toBeGreaterThan(40);
      // Millisecond times and centimetres round-trip to the last bits only.
      for (const key of ['sl_min_um', 'sl_max_um', 'sl_mean_um', 'force_mean', 'duration_s']) expect(y[key]).toBeCloseTo(x[key], 6);
    }
  });

  it('refuses a CSV file in columns the mapping does not name, saying which, and a mapping that is not one', async () => {
    const csv = await runLengthwise(['replay', DEMO_CSV, '--mapping', MAPPING, '--speed', 'max', '--plain']);
    expect(csv.code).toBe(1);
    expect(csv.stderr).toContain('no line among the first 64 names the columns "time_ms" (fields.t)');
    expect(csv.stderr).toContain('line 1, the likeliest header row, has "time_s", "muscle", "fascicle_mm"');
    const dir = await tmp();
    const bad = join(dir, 'bad-mapping.json');
    await writeFile(bad, JSON.stringify({ format: 'lengthwise-mapping', version: 1, fields: { t: 3 } }));
    const refused = await runLengthwise(['replay', DEMO, '--mapping', bad, '--speed', 'max']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('the device mapping was not accepted');
    expect(refused.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('lengthwise replay: calibration methods, activation and estimated strides in the outputs', () => {
  it('says a prior from published architecture with its caution, the activation shift, a whole-muscle shape and where estimated strides start', async () => {
    const dir = await tmp();
    // An invented trial: a steady 1.1 s cycle with no gait events, and an activation per sample (an EMG-like envelope).
    const lines = [JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } })];
    for (let i = 0; i <= 1320; i++) {
      const t = i / 100;
      const activation = Number((0.2 + 0.15 * Math.cos((2 * Math.PI * t) / 1.1)).toFixed(3));
      lines.push(JSON.stringify({ t, muscle: 'calf', fascicle_mm: Number((60 + 5 * Math.cos((2 * Math.PI * t) / 1.1)).toFixed(3)), activation }));
    }
    const trial = join(dir, 'walk.ndjson');
    await writeFile(trial, `${lines.join('\n')}\n`);
    const calibration = join(dir, 'cal.json');
    await writeFile(
      calibration,
      JSON.stringify({
        muscles: {
          calf: { method: 'architecture_prior', prior_fibre_mm: 60, prior_fibre_sd_mm: 6, prior_sarcomere_um: 2.7, prior_source: 'an invented table', shape: 'gaussian', activation_shift: 0.15 },
        },
      }),
    );
    const summaryPath = join(dir, 'summary.json');
    const reportPath = join(dir, 'report.html');
    const ran = await runLengthwise(['replay', trial, '--calibration', calibration, '--speed', 'max', '--plain', '--summary', summaryPath, '--report', reportPath]);
    expect(ran.code).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    const calf = summary.muscles.calf;
    expect(calf.calibration_method).toBe('prior from published architecture');
    expect(calf.sarcomeres_in_series).toBeCloseTo(60_000 / 2.7, 2); // the count is written to 2 decimals
    expect(calf.sarcomeres_in_series_relative_sd).toBeCloseTo(0.1, 12);
    expect(calf.sarcomeres_in_series_distribution).toBe('lognormal');
    expect(calf.shape).toBe('gaussian');
    expect(calf.activation).toEqual({ shift: 0.15, assumed: 1, samples_with_activation: 1321 });
    expect(calf.segmentation).toBe('estimated');
    expect(calf.stride_start).toBe('fascicle_length_minimum');
    // Minima at 0.55 + 1.1k s, k = 0…11: eleven full cycles, all counted.
    expect(calf.trial.stride_count).toBe(11);
    const warnings = summary.warnings.join('\n');
    expect(warnings).toMatch(/calf: calibrated by a prior from published architecture \(an invented table\): cadaveric fibre length is not the living fascicle length/);
    expect(warnings).toMatch(/calf: optimal length shifts with activation/);
    expect(warnings).toMatch(/calf: force from the gaussian shape, a whole-muscle curve/);
    expect(warnings).toMatch(/each starts at the fascicle-length minimum, not at a foot strike/);
    const html = await readFile(reportPath, 'utf8');
    expect(html).toContain('prior from published architecture: cadaveric fibre length is not the living fascicle length');
    expect(html).toContain('each starts at the fascicle-length minimum, not at a foot strike');
    expect(html).toContain('optimal length shifts with activation');
    expect(html).toContain('force from the gaussian shape, a whole-muscle curve');
  });
});

describe('parseSpeed', () => {
  it('takes a positive number or max', () => {
    expect(parseSpeed('4')).toEqual({ ok: true, speed: 4 });
    expect(parseSpeed('0.5')).toEqual({ ok: true, speed: 0.5 });
    expect(parseSpeed('max')).toEqual({ ok: true, speed: 'max' });
    for (const bad of ['0', '-1', '', 'NaN', 'Infinity', 'two']) expect(parseSpeed(bad).ok).toBe(false);
  });
});

describe('speedOnceShown (the replay with its dashboard)', () => {
  const sample = (tS: number) => makeSample(tS, 'calf', 50, Number.NaN, 1, 0);

  it('plays nothing until the screen is shown, then plays from the first sample at the speed set by then', () => {
    new TestScheduler((actual, expected) => expect(actual).toEqual(expected)).run(({ cold, hot, expectObservable }) => {
      const [a, b, c] = [sample(0), sample(1), sample(2)];
      const speed$ = new BehaviorSubject<Speed>(1);
      // The screen takes 5 s to come up; meanwhile the speed is doubled.
      const shown$ = hot<void>('5s a');
      cold('2s a').subscribe(() => speed$.next(2));
      const played$ = cold('(t|)', { t: [a, b, c] }).pipe(paceReplayWith(speedOnceShown(shown$, speed$)));
      // The trial's clock starts when the screen is up: its first second takes half a second at speed 2.
      expectObservable(played$).toBe('5s a 499ms b 499ms (c|)', { a: [a], b: [b], c: [c] });
    });
  });

  it('keeps following the speed after the screen is shown, and a second "shown" changes nothing', () => {
    new TestScheduler((actual, expected) => expect(actual).toEqual(expected)).run(({ cold, hot, expectObservable }) => {
      const speed$ = new BehaviorSubject<Speed>(1);
      cold('1s a').subscribe(() => speed$.next(4));
      const shown$ = hot<void>('500ms a 1s a');
      expectObservable(speedOnceShown(shown$, speed$)).toBe('500ms a 499ms b', { a: 1, b: 4 });
    });
  });
});
