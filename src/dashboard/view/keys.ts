/** The dashboard's keys, said once here: the footer, the help screen and the key handler read this. */

export interface KeyHelp {
  readonly keys: string;
  readonly does: string;
  /** Which callback must be given for the key to work (none: always). */
  readonly needs?: 'onMarker' | 'onSpeed' | 'onCalibrate' | 'manyMuscles';
  /** Short word for the footer. */
  readonly short: string;
}

export const KEY_HELP: readonly KeyHelp[] = [
  { keys: 'q', short: 'quit', does: 'quit: stop the trial and write its summary' },
  { keys: 'space', short: 'freeze', does: 'freeze the display (ingestion goes on); space again resumes' },
  { keys: 'm', short: 'marker', does: 'place a timestamped marker in the trial', needs: 'onMarker' },
  {
    keys: 'c',
    short: 'calibrate',
    does: 'calibrate the focused muscle from its last 3 s at this posture',
    needs: 'onCalibrate',
  },
  { keys: 'tab ←→', short: 'muscle', does: 'focus the next / previous muscle', needs: 'manyMuscles' },
  { keys: '+ -', short: 'speed', does: 'replay faster / slower', needs: 'onSpeed' },
  { keys: '?', short: 'help', does: 'show or hide this help' },
];

/** Sarcomere length assumed at the calibration posture when none is typed (µm; common practice, no source). */
export const DEFAULT_CALIBRATION_UM = 2.7;
