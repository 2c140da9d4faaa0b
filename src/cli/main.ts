/** The `rhosigma` command (placeholder until the command line lands). */
export async function main(argv: string[]): Promise<number> {
  process.stdout.write(`rhosigma: nothing here yet (${argv.join(' ')})\n`);
  return 0;
}
