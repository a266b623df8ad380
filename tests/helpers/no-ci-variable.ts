// Run before every test file (vitest.config.ts). Ink reads CI and CONTINUOUS_INTEGRATION once, when it
// loads, and then holds every frame back until the end; the dashboard tests read frames as they come,
// like a person at a terminal, where no such variable is set. The screen's own thread leaves them out
// by itself (screenEnv), and a test there sets CI on purpose to check it.
delete process.env['CI'];
delete process.env['CONTINUOUS_INTEGRATION'];
