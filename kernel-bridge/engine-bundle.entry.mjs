// Entry of the engine bundle shipped in the wheel (webpack.engine.config.cjs): the `rhosigma` command,
// compiled to dist/ by `npm run build`, in one file that needs nothing but `node` to run.
import { main } from '../dist/cli/main.js';

main(process.argv.slice(2)).then((code) => {
  process.exitCode = code;
});
