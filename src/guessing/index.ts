/**
 * The guessing layer as one namespace: guesswork without side information and with classical side
 * information, the Rényi-entropy bounds and the plain SDP over all orders (guesswork.ts); guesswork,
 * success within k guesses and giving up with quantum side information by column generation
 * (side-information.ts, column-generation.ts); the streamed pricing of every order (orders.ts).
 * Deliberately nothing of its own. Cost: none.
 */
export * from './guesswork.js';
export * from './side-information.js';
export * from './column-generation.js';
export * from './orders.js';
