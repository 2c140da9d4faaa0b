"""The widget module's name and semver range, the same as the TypeScript package's (src/widgets/version.ts:
the npm package's name and "^" + its version); tests/test_widgets_kernel.py compares them."""
MODULE_NAME = "rhosigma"
MODULE_VERSION = "^0.1.0"
