/**
 * `npm run --silent fit -- [options] FILE...`: fit traced flights from CSV files (see `--help`).
 * The work is in scripts/fit/cli.ts; this file wires it to the process.
 */
import { runFitCli } from './fit/cli';

const status = await runFitCli(process.argv.slice(2), {
  out: (line) => process.stdout.write(line + '\n'),
  err: (line) => process.stderr.write(line + '\n'),
});
process.exitCode = status;
