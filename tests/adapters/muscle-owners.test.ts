import { describe, expect, it } from 'vitest';
import { conflictText, MuscleOwners, REFUSED_KEY } from '../../adapters/muscle-owners.ts';
import { decodeMessage, headerJsonOf } from '../../adapters/device-mapping.ts';
import type { Frame, Header } from '../../src/trial/records.ts';

const header = (muscles: Record<string, { side?: 'left' | 'right' }>, extra: Record<string, unknown> = {}): string =>
  JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles, ...extra });
const frames = (text: string): Frame[] => decodeMessage(text, 1);
const sample = (muscle: string): string => JSON.stringify({ t: 0, muscle, fascicle_mm: 50 });
const headerIn = (fs: readonly Frame[]): Header => fs.find((f): f is Header => f.kind === 'header') as Header;

describe('MuscleOwners', () => {
  it('lets each device declare its own muscles, and a second device declare others', () => {
    const owners = new MuscleOwners();
    expect(owners.check(1, frames(header({ calf: { side: 'left' } }))).conflicts).toEqual([]);
    const second = owners.check(2, frames(header({ thigh: { side: 'right' } })));
    expect(second.conflicts).toEqual([]);
    expect(headerIn(second.frames).muscles).toEqual({ thigh: { side: 'right' } });
  });

  it('refuses another device\'s side for a muscle a device declared, keeping the rest of the header', () => {
    const owners = new MuscleOwners();
    owners.check(1, frames(header({ calf: { side: 'left' } })));
    const calibration = { muscles: { shin: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: 20000 } } };
    const given = frames(header({ calf: { side: 'right' }, shin: { side: 'right' } }, { subject: 'SYN-5', calibration }));
    const checked = owners.check(2, given);
    expect(checked.conflicts).toEqual([{ muscle: 'calf', connection: 2, owner: 1, declared: 'right', kept: 'left' }]);
    const h = headerIn(checked.frames);
    expect(h.muscles).toEqual({ shin: { side: 'right' } });
    expect(h.subject).toBe('SYN-5');
    expect(h.calibration?.muscles['shin']).toBeDefined();
    // The session log gets the header as received, less the refused declaration, which stands beside it.
    const logged = JSON.parse(headerJsonOf(h) ?? '{}') as Record<string, unknown>;
    expect(logged['muscles']).toEqual({ shin: { side: 'right' } });
    expect(logged[REFUSED_KEY]).toEqual({ calf: { side: 'right' } });
    expect(logged['calibration']).toEqual(calibration);
    // Read again, the logged line is the same header (the refused key is ignored).
    expect(headerIn(frames(headerJsonOf(h) ?? '')).muscles).toEqual({ shin: { side: 'right' } });
    // The frames given are left as they were.
    expect(headerIn(given).muscles).toEqual({ calf: { side: 'right' }, shin: { side: 'right' } });
  });

  it('refuses a side for a muscle another device sends samples of, though it declared none', () => {
    const owners = new MuscleOwners();
    owners.check(1, frames(`[${sample('calf')}]`));
    expect(owners.check(2, frames(header({ calf: { side: 'left' } }))).conflicts).toEqual([{ muscle: 'calf', connection: 2, owner: 1, declared: 'left', kept: null }]);
  });

  it('takes the same side again, or a declaration with no side, as no conflict', () => {
    const owners = new MuscleOwners();
    owners.check(1, frames(header({ calf: { side: 'left' } })));
    expect(owners.check(2, frames(header({ calf: { side: 'left' } }))).conflicts).toEqual([]);
    expect(owners.check(2, frames(header({ calf: {} }))).conflicts).toEqual([]);
  });

  it('lets a device change its own declarations, and frees a device\'s muscles when it disconnects', () => {
    const owners = new MuscleOwners();
    owners.check(1, frames(header({ calf: { side: 'left' } })));
    expect(owners.check(1, frames(header({ calf: { side: 'right' } }))).conflicts).toEqual([]);
    owners.release(1);
    expect(owners.check(2, frames(header({ calf: { side: 'left' } }))).conflicts).toEqual([]);
  });

  it('keeps muscle names of any text: a sample of "__proto__" claims that muscle like any other', () => {
    const owners = new MuscleOwners();
    owners.check(1, frames(`[${sample('__proto__')},${sample('calf, "medial"')}]`));
    const checked = owners.check(2, frames(header({ 'calf, "medial"': { side: 'right' }, toString: { side: 'left' } } as const)));
    expect(checked.conflicts.map((c) => c.muscle)).toEqual(['calf, "medial"']);
    expect(Object.keys(headerIn(checked.frames).muscles)).toEqual(['toString']);
  });

  it('says a conflict with the devices, the muscle and why', () => {
    expect(conflictText({ muscle: 'calf', connection: 2, owner: 1, declared: 'right', kept: 'left' }, '127.0.0.1:5000')).toBe(
      'refused the header of device 2 (127.0.0.1:5000) for muscle "calf" as right: device 1 carries it (left), and a device sets sides only for its own muscles',
    );
  });
});
