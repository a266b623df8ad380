/**
 * Which connected device carries which muscle, for a server several devices push to: a device's header
 * sets sides only for its own muscles. A muscle belongs to the first open connection that declared it
 * in a header or sent a sample of it, until that connection closes. A later header from another device
 * that declares that muscle with a different side (or a side where the owner declared none) is a
 * conflict: the declaration is refused (left out of the header the pipeline and the session log get,
 * and kept beside it under `refused_muscles`, which readers ignore), and the server says so.
 */
import type { Frame, Header, MuscleDeclaration } from '../src/trial/records.ts';
import { decodeMessage, headerJsonOf } from './device-mapping.ts';

/** A refused declaration: which device, which muscle, and whose it is. */
export interface SideConflict {
  readonly muscle: string;
  readonly connection: number;
  readonly owner: number;
  /** The side the refused header declared, or null when it declared the muscle with no side. */
  readonly declared: string | null;
  /** The side the owner declared, or null when it declared none. */
  readonly kept: string | null;
}

interface Owner {
  readonly connection: number;
  side: string | null;
}

/** The key of a stripped header under which the refused declarations are kept (ignored by readers). */
export const REFUSED_KEY = 'refused_muscles';

export class MuscleOwners {
  private readonly owners = new Map<string, Owner>();

  /**
   * One connection's frames, on their way in: notes the muscles it carries, and gives the frames with
   * each conflicting declaration taken out of its header, and the conflicts found.
   */
  check(connection: number, frames: readonly Frame[]): { readonly frames: Frame[]; readonly conflicts: readonly SideConflict[] } {
    let out: Frame[] | null = null;
    const conflicts: SideConflict[] = [];
    for (let i = 0; i < frames.length; i++) {
      const f = frames[i] as Frame;
      if (f.kind === 'sample') {
        if (!this.owners.has(f.muscle)) this.owners.set(f.muscle, { connection, side: null });
        continue;
      }
      if (f.kind !== 'header') continue;
      const refused: [string, MuscleDeclaration][] = [];
      for (const [name, declaration] of Object.entries(f.muscles)) {
        const side = declaration.side ?? null;
        const owner = this.owners.get(name);
        if (owner === undefined) this.owners.set(name, { connection, side });
        else if (owner.connection === connection) owner.side = side ?? owner.side;
        else if (side !== owner.side && side !== null) {
          refused.push([name, declaration]);
          conflicts.push({ muscle: name, connection, owner: owner.connection, declared: side, kept: owner.side });
        }
      }
      if (refused.length === 0) continue;
      out ??= frames.slice();
      out[i] = withoutDeclarations(f, refused);
    }
    return { frames: out ?? (frames as Frame[]), conflicts };
  }

  /** The connection closed: its muscles are free for the next device that carries them. */
  release(connection: number): void {
    for (const [name, owner] of this.owners) if (owner.connection === connection) this.owners.delete(name);
  }
}

/**
 * The header without the refused declarations, its text kept for the session log: the header as
 * received, less those muscles, plus the refused declarations under REFUSED_KEY.
 */
function withoutDeclarations(h: Header, refused: readonly [string, MuscleDeclaration][]): Header {
  const names = new Set(refused.map(([name]) => name));
  const muscles: Record<string, MuscleDeclaration> = Object.create(null) as Record<string, MuscleDeclaration>;
  for (const [name, declaration] of Object.entries(h.muscles)) if (!names.has(name)) muscles[name] = declaration;
  const raw = headerJsonOf(h);
  if (raw !== undefined) {
    try {
      const value = JSON.parse(raw) as Record<string, unknown>;
      const kept: Record<string, unknown> = Object.create(null) as Record<string, unknown>;
      const given = value['muscles'];
      if (typeof given === 'object' && given !== null) {
        for (const [name, declaration] of Object.entries(given)) if (!names.has(name)) kept[name] = declaration;
      }
      value['muscles'] = kept;
      value[REFUSED_KEY] = Object.fromEntries(refused.map(([name, declaration]) => [name, { ...declaration }]));
      const [again] = decodeMessage(JSON.stringify(value), h.line, null);
      if (again?.kind === 'header') return again;
    } catch {
      // Not shown again as received: the header's own fields below.
    }
  }
  return { ...h, muscles };
}

/** A conflict said for a person: what was refused, and why. */
export function conflictText(c: SideConflict, peer: string): string {
  const declared = c.declared === null ? 'with no side' : `as ${c.declared}`;
  const kept = c.kept === null ? 'no side declared' : c.kept;
  return `refused the header of device ${c.connection} (${peer}) for muscle "${c.muscle}" ${declared}: device ${c.owner} carries it (${kept}), and a device sets sides only for its own muscles`;
}
