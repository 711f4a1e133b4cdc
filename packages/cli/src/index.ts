/**
 * @railcheck/cli: the `railcheck` command as a library (for embedding and
 * tests) and its presenters.
 */
export { main, demoPath, EXIT_OK, EXIT_LIMIT_FAILED, EXIT_ERROR } from './main.js';
export type { CliIo } from './main.js';
export { formatReport, formatOperatingPoint, formatSweep, formatWarnings } from './present/text.js';
export { reportJson } from './present/json.js';
export { parseArgs, flagHelp } from './args.js';
export type { FlagSpec, ParsedArgs } from './args.js';
