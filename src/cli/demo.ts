/**
 * `rhosigma demo`: a short report computed by the engine through the plain-data protocol.
 *
 * Placeholder: it shows one request and its answer (the spectrum op) so the command is wired end to end;
 * the integrator replaces the content with the project's worked scenarios. It deliberately computes
 * nothing itself: every number comes from `handle`. Cost: one small eigendecomposition.
 */
import '../ops/all.js';
import { handle } from '../ops/handle.js';

/** Write the report with `write`; resolves to the exit code (0 when every request was answered ok). */
export async function runDemo(write: (text: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  // An invented example: a qubit prepared along +x with probability 3/4, else along −x.
  const request = { op: 'spectrum', matrix: [['1/2', '1/4'], ['1/4', '1/2']] };
  const answer = handle(request);
  write('rhosigma demo (placeholder)\n\n');
  write(`request: ${JSON.stringify(request)}\n`);
  write(`answer:  ${JSON.stringify(answer)}\n`);
  if (answer.ok) {
    const [low, high] = answer.value as number[];
    write(`\nThe mixture of |+⟩ (weight 3/4) and |−⟩ (weight 1/4) has eigenvalues ${low.toFixed(4)} and ${high.toFixed(4)}.\n`);
  }
  return answer.ok ? 0 : 1;
}
