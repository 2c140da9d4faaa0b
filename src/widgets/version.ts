/**
 * The widget module's name and versions (docs/surfaces.md): the npm package's name; MODULE_VERSION, the
 * semver range "^" + its version that every model and view names (Python declares the same in
 * rhosigma._frontend); PACKAGE_VERSION, the exact version the plugin registers with the widget registry
 * (which must satisfy the models' range). kernel-bridge/tests/test_widgets_kernel.py checks all three
 * against package.json.
 *
 * Deliberately not here: anything else. Cost: none.
 */
export const MODULE_NAME = 'rhosigma';
export const PACKAGE_VERSION = '0.1.0';
export const MODULE_VERSION = `^${PACKAGE_VERSION}`;
