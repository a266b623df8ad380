/**
 * The frame on screen: subscribes to a stream of frames (see trial-frames.ts) and shows the newest one,
 * except while frozen, when the shown frame stays as it is and the newest is kept for the release.
 * Unsubscribes on cleanup.
 */
import { useEffect, useRef, useState } from 'react';
import type { Observable } from 'rxjs';
import type { TrialFrame } from '../view/trial-frames.ts';

export function useFrames(frames$: Observable<TrialFrame>, frozen: boolean, initial: () => TrialFrame): TrialFrame {
  const [shown, setShown] = useState<TrialFrame>(initial);
  // Read by the subscription at each frame, so it is set as the screen renders, not an effect later.
  const frozenRef = useRef(frozen);
  frozenRef.current = frozen;
  const newest = useRef<TrialFrame | null>(null);

  useEffect(() => {
    if (!frozen && newest.current !== null) setShown(newest.current);
  }, [frozen]);

  useEffect(() => {
    const subscription = frames$.subscribe((frame) => {
      newest.current = frame;
      if (!frozenRef.current) setShown(frame);
    });
    return () => subscription.unsubscribe();
  }, [frames$]);

  return shown;
}
