/** `lengthwise settings`: every processing setting with its default, as a settings file to start from. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { SETTINGS_OPTION, settingsOption } from './option-files.ts';
import { SETTING_EXPLANATIONS, SETTING_KEYS, settingsDocument, type Settings } from '../trial/settings.ts';

const HELP = `usage: lengthwise settings [--explain] [--settings FILE]

Prints every processing setting with its default, as a settings file (lengthwise-settings JSON) to save,
change and give any command with --settings FILE. A key left out of such a file keeps its default; a key
the tool does not know is refused, with the nearest one it knows.

options:
  --explain              say what each setting does, one line each, instead of the JSON
  --settings FILE        check FILE and print the settings it gives (its values, the defaults for the rest)
  -h, --help             this text

Exit status: 0 printed, 2 a usage error or a settings file that is not accepted.`;

/** One line per setting: its key, its value, what it does. */
export function explainSettings(settings: Settings): string {
  const width = Math.max(...SETTING_KEYS.map((k) => k.length));
  const valueWidth = Math.max(...SETTING_KEYS.map((k) => String(settings[k]).length));
  return SETTING_KEYS.map((k) => `${k.padEnd(width)}  ${String(settings[k]).padStart(valueWidth)}  ${SETTING_EXPLANATIONS[k]}`).join('\n');
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('settings', HELP, argv, { explain: { type: 'boolean', default: false }, ...SETTINGS_OPTION }, io, { allowPositionals: false });
  if (typeof parsed === 'number') return parsed;
  const settings = await settingsOption('settings', parsed.values.settings, io);
  if (!settings.ok) return 2;
  io.out(parsed.values.explain ? explainSettings(settings.value) : JSON.stringify(settingsDocument(settings.value), null, 2));
  return 0;
}
