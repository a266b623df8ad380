#!/usr/bin/env node
// Runs the build of the TypeScript sources (dist/, made by build.js when `npm install` runs): plain
// JavaScript, so no compiler or loader runs when the command starts.

// React's development build costs the dashboard about 1.7 times the CPU; users get the production one.
process.env.NODE_ENV ??= 'production';

const CLI = new URL('../dist/cli.js', import.meta.url);
let cli;
try {
  cli = await import(CLI.href);
} catch (error) {
  if (error?.code !== 'ERR_MODULE_NOT_FOUND' || !String(error.message).includes(CLI.pathname)) throw error;
  const root = new URL('..', import.meta.url).pathname;
  console.error(
    `lengthwise: the build is missing (${CLI.pathname} was not found). ` +
      `It is made when the package is installed: run \`npm install\` (or \`npm run build\`) in ${root}.`,
  );
  process.exit(1);
}
process.exitCode = await cli.main(process.argv.slice(2));
