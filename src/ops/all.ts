/**
 * Imports every op module so that each registers itself (src/ops/registry.ts). One line per module;
 * whoever adds an op module adds its line here and then runs `npm run schema`.
 */
import './matrix-ops.js';
import './channel-ops.js';
import './distance-ops.js';
import './entropy-ops.js';
import './guesswork-ops.js';
import './guessing-ops.js';
import './recovery-ops.js';
import './oneshot-ops.js';
import './random-ops.js';
import './state-ops.js';
import './verify-ops.js';
