/** quantum: states, channels and channel presets on top of linalg. No quantities (entropies etc.) here. */
export * from './types.js';
export * from './validate.js';
export * from './arguments.js';
export * from './states.js';
export * from './channels.js';
export * from './presets.js';
