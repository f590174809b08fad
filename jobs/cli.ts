/**
 * Driftline's command-line entry point: `tsx jobs/cli.ts <command> [args]`.
 * Each command lives in jobs/commands/<name>.ts and returns its exit code; this file only
 * dispatches, so commands stay plain async functions that tests can call directly.
 */

type Command = (argv: string[]) => Promise<number>;

const USAGE = `Usage: tsx jobs/cli.ts <command> [options]

Commands:
  simulate   Write a simulated site (stored map, metadata, daily scan logs, ground truth)
             to a folder. Run "simulate --help" for its options.
  analyze    Analyse scan logs against a stored map. Run "analyze --help" for its options.
  restore    Restore a database backup into the data directory (stop the server first).
             Run "restore --help" for details.

Options:
  --help     Show this text.
`;

/** Loads a command module by path and picks its exported function; null when the file is absent. */
async function load(specifier: string, exportName: string): Promise<Command | null> {
  try {
    // A non-literal specifier keeps the type checker from requiring modules that another
    // part of the project adds later.
    const mod = (await import(specifier)) as Record<string, unknown>;
    const fn = mod[exportName];
    if (typeof fn !== 'function') throw new Error(`${specifier} does not export ${exportName}().`);
    return fn as Command;
  } catch (err) {
    const code = (err as { code?: string }).code;
    if ((code === 'ERR_MODULE_NOT_FOUND' || code === 'MODULE_NOT_FOUND') && String((err as Error).message).includes(specifier.replace(/^\.\//, '').replace(/\.js$/, ''))) {
      return null;
    }
    throw err;
  }
}

const COMMANDS: Record<string, { specifier: string; exportName: string }> = {
  simulate: { specifier: './commands/simulate.js', exportName: 'runSimulate' },
  analyze: { specifier: './commands/analyze.js', exportName: 'runAnalyze' },
  restore: { specifier: './commands/restore.js', exportName: 'runRestore' },
};

/** Runs the command named in `argv[0]` with the rest of `argv`; resolves to the process exit code (0 ok, 2 bad usage). */
export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(USAGE);
    return 0;
  }
  if (name === undefined) {
    process.stderr.write(`No command given.\n\n${USAGE}`);
    return 2;
  }
  const entry = COMMANDS[name];
  if (!entry) {
    process.stderr.write(`Unknown command "${name}". Known commands: ${Object.keys(COMMANDS).join(', ')}.\n`);
    return 2;
  }
  const command = await load(entry.specifier, entry.exportName);
  if (!command) {
    process.stderr.write(`The "${name}" command is not available in this checkout (jobs/commands/${name}.ts is missing).\n`);
    return 1;
  }
  return command(rest);
}

process.exitCode = await main(process.argv.slice(2));
