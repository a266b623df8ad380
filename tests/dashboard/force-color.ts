// Imported first by tests that must see colour codes: chalk reads FORCE_COLOR once, when it loads,
// and a test worker's stdout is not a terminal.
process.env['FORCE_COLOR'] = '1';
