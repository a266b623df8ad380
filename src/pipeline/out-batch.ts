import type { Batch, Frame } from '../trial/records.ts';

/**
 * The batch a stage passes on while it walks its input and inserts frames of its own (a Gap, a Notice, a
 * StrideBoundary). Insertions are rare, so the input itself goes on until the first one, which copies
 * the frames passed so far once; every input frame must be passed, in order.
 */
export class OutBatch {
  private copy: Frame[] | null = null;
  private passed = 0;

  constructor(private readonly input: Batch) {}

  /** The next input frame goes on. */
  pass(frame: Frame): void {
    if (this.copy === null) this.passed++;
    else this.copy.push(frame);
  }

  /** A frame of the stage's own goes on here, after the input frames passed so far. */
  insert(frame: Frame): void {
    (this.copy ??= this.input.slice(0, this.passed)).push(frame);
  }

  /** What goes on: the input batch itself when nothing was inserted. */
  done(): Batch {
    return this.copy ?? this.input;
  }
}
