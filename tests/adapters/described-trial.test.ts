import { setTimeout as sleep } from 'node:timers/promises';
import { BehaviorSubject, lastValueFrom, toArray } from 'rxjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDescription, resolveDescription, TrialDescriptionError } from '../../adapters/described-trial.ts';
import { parseDeviceMapping } from '../../adapters/device-mapping.ts';
import { trialSource } from '../../adapters/trial-source.ts';
import type { Frame } from '../../src/trial/records.ts';
import { twoProbeTrial, type TwoProbeTrial } from '../helpers/two-probe-trial.ts';
import { tempDir } from './invented-trial.ts';

const tmp = tempDir();
let t: TwoProbeTrial;
beforeAll(async () => {
  t = await twoProbeTrial(tmp.dir, 30);
}, 30_000);
afterAll(() => tmp.remove());

function commandMapping() {
  const r = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'right' } } });
  if (!r.ok) throw new Error(r.problems.join('; '));
  return r.mapping;
}

describe('resolveDescription', () => {
  it('reads each recording through its own mapping, the events file through a mapping given at its top level, and the sides of the mappings', async () => {
    const r = await resolveDescription(t.description);
    if (!r.ok) throw new Error(r.message);
    const x = r.resolved;
    expect(x.recordings.map((rec) => [rec.file, rec.mappingPath, rec.timeOffsetS])).toEqual([
      [t.calf, t.calfMapping, 0],
      [t.thigh, t.thighMapping, -412.35],
    ]);
    expect(x.events?.file).toBe(t.events);
    expect(x.events?.mapping?.events?.given).toEqual({ t: 'time', event: 'kind', side: 'foot' });
    expect({ ...x.sides }).toEqual({ calf: 'left', thigh: 'right' });
    expect(x.notes).toEqual([]);
    expect(x.calibration?.muscles).toHaveProperty('calf');
    expect(x.files.map((f) => f.path)).toEqual([t.description, t.calf, t.calfMapping, t.thigh, t.thighMapping, t.events, t.eventsMapping, t.calibration]);
  });

  it('reads every recording and the events file through --mapping when one is given, and says so', async () => {
    const r = await resolveDescription(t.description, { mapping: commandMapping(), eventsPath: t.both });
    if (!r.ok) throw new Error(r.message);
    expect(r.resolved.recordings.every((rec) => rec.mappingPath === null && rec.mapping !== null)).toBe(true);
    expect(r.resolved.notes).toEqual([
      `--mapping wins over the description's mappings (${t.calfMapping}, ${t.thighMapping}, ${t.eventsMapping}): every recording and the events file are read through it`,
      `--events wins over the description's events file (${t.events})`,
    ]);
    expect({ ...r.resolved.sides }).toEqual({ calf: 'right' });
    expect(r.resolved.files.map((f) => f.path)).toEqual([t.description, t.calf, t.thigh, t.both, t.calibration]);
  });

  it('refuses two mappings that give one muscle two sides, and a mapping it does not accept, naming the files', async () => {
    const clash = tmp.file('clash-map.json', JSON.stringify({ format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'right' } } }));
    const path = await t.describe('clash.json', { ...t.content, recordings: [t.content.recordings[0], { ...t.content.recordings[1], mapping: 'clash-map.json' }] });
    const r = await resolveDescription(path);
    expect(r).toEqual({ ok: false, status: 2, message: `the trial description was not accepted:\n  muscle "calf" is left in ${t.calfMapping} and right in ${clash}: give each muscle one side` });
    const bad = tmp.file('bad-map.json', JSON.stringify({ format: 'lengthwise-mapping', version: 1, units: { length: 'inch' } }));
    const withBad = await t.describe('with-bad.json', { ...t.content, recordings: [{ file: 'calf.csv', mapping: 'bad-map.json' }] });
    const b = await resolveDescription(withBad);
    expect(b.ok ? '' : b.message).toContain(`the mapping of ${t.calf} was not accepted:\n  ${bad}: units.length:`);
  });
});

describe('a description\'s records', () => {
  it('begin with its header and notes, then the recordings\' frames in time order on one clock with the events merged in', async () => {
    const opened = await openDescription(t.description, { eventsPath: t.events });
    if (!opened.ok) throw new Error(opened.message);
    const frames = (await lastValueFrom(opened.opened.records().pipe(toArray()))).flat();
    expect(frames[0]).toEqual({ kind: 'header', subject: 'SYN-031', trial: 'walk-2probe', muscles: {}, line: 0 });
    expect(frames[1]).toMatchObject({ kind: 'notice', text: `--events wins over the description's events file (${t.events}); it is read through the description's events mapping (${t.eventsMapping})` });
    const timed = frames.filter((f): f is Extract<Frame, { tS: number }> => f.kind === 'sample' || f.kind === 'event');
    for (let i = 1; i < timed.length; i++) expect((timed[i] as { tS: number }).tS).toBeGreaterThanOrEqual((timed[i - 1] as { tS: number }).tS);
    expect(timed.filter((f) => f.kind === 'sample')).toHaveLength(6000);
    expect(opened.opened.shared).toEqual({ firstS: 0, lastS: expect.closeTo(29.99, 9) as number });
  });

  it('stop being read while the consumer pauses, and go on when it resumes', async () => {
    const pause$ = new BehaviorSubject(true);
    const seen: Frame[] = [];
    let done = false;
    trialSource(t.description, { pause$ }).subscribe({ next: (b) => seen.push(...b), complete: () => (done = true) });
    // Paused from the start, each recording gives at most the chunk it had in hand.
    await sleep(300);
    expect(done).toBe(false);
    expect(seen.filter((f) => f.kind === 'sample').length).toBeLessThan(6000);
    pause$.next(false);
    const end = Date.now() + 15_000;
    while (!done && Date.now() < end) await sleep(20);
    expect(done).toBe(true);
    expect(seen.filter((f) => f.kind === 'sample')).toHaveLength(6000);
  });

  it('as a trial source, error with the reason when the description cannot be used', async () => {
    const missing = await t.describe('missing.json', { format: 'lengthwise-trial', version: 1, recordings: [{ file: 'calf.csv' }, { file: 'gone.csv' }] });
    const error = await lastValueFrom(trialSource(missing)).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(TrialDescriptionError);
    expect((error as TrialDescriptionError).status).toBe(1);
    expect((error as Error).message).toMatch(new RegExp(`^${missing.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: cannot read .*gone\\.csv \\(ENOENT: no such file\\)`));
  });
});
