/** The trial's view alone, at a bounded frame rate (see use-trial-frame.ts); for screens without a status stream. */
import type { Observable } from 'rxjs';
import type { TrialState } from '../state.ts';
import { useTrialFrame, type TrialFrameOptions } from './use-trial-frame.ts';
import type { TrialView } from './view-model.ts';

export type TrialViewOptions = TrialFrameOptions;

export function useTrialView(state$: Observable<TrialState>, options: TrialViewOptions = {}): TrialView {
  return useTrialFrame(state$, undefined, options).view;
}
