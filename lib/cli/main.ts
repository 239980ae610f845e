/**
 * Solvatlas command line: `npm run --silent cli -- <command> ...`. Prints JSON on stdout and nothing
 * else; on bad input exits non-zero with one sentence on stderr and nothing on stdout.
 */
import { runCli } from "./run";

runCli(process.argv.slice(2)).then(
  (output) => {
    process.stdout.write(JSON.stringify(output) + "\n");
  },
  (error: unknown) => {
    const message = error instanceof Error ? error.message : String(error);
    process.stderr.write(message.replace(/\s+/g, " ").trim() + "\n");
    process.exitCode = 1;
  },
);
