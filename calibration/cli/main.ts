/**
 * Fluxwright command line for lab scripts: `npm run --silent cli -- <fit|plan|rank> …`.
 * The JSON each command prints with --json is a contract: extend it, never rename keys.
 */
import { runFit, type CommandOutput } from './fit';
import { runPlan, runRank } from './plan';

const USAGE = `usage: cli <command> [options]
  fit FILE …   fit the SQUID-terminated line model to a sweep (cli fit --help)
  plan …       drive plan for a target pair rate or gain from a calibration JSON
  rank …       rank operating points over the calibrated bias range
`;

function dispatch(argv: string[]): CommandOutput {
  const [command, ...rest] = argv;
  switch (command) {
    case 'fit':
      return runFit(rest);
    case 'plan':
      return runPlan(rest);
    case 'rank':
      return runRank(rest);
    case undefined:
    case '--help':
    case 'help':
      return { stdout: USAGE, exitCode: command === undefined ? 2 : 0 };
    default:
      return { stdout: '', stderr: `unknown command '${command}'\n${USAGE}`, exitCode: 2 };
  }
}

function main(): void {
  let out: CommandOutput;
  try {
    out = dispatch(process.argv.slice(2));
  } catch (e) {
    out = { stdout: '', stderr: `internal error: ${(e as Error).stack ?? e}\n`, exitCode: 70 };
  }
  if (out.stdout) process.stdout.write(out.stdout);
  if (out.stderr) process.stderr.write(out.stderr);
  process.exitCode = out.exitCode;
}

main();
