// Runs the `rhosigma` command from source in a real process (what bin/rhosigma.js does with dist/),
// so the CLI tests exercise real stdin, stdout, stderr and exit codes without a build step.
import { main } from '../../src/cli/main.js';

process.exitCode = await main(process.argv.slice(2));
