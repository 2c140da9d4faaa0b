/**
 * The widget module's name and semver range (docs/surfaces.md): the npm package's name and "^" + its
 * version. Python declares the same (rhosigma._frontend); kernel-bridge/tests/test_widgets_kernel.py
 * checks both against package.json.
 *
 * Deliberately not here: anything else. Cost: none.
 */
export const MODULE_NAME = 'rhosigma';
export const MODULE_VERSION = '^0.1.0';
