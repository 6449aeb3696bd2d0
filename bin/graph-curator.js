#!/usr/bin/env node
// Thin launcher: the CLI itself is bundled to dist/cli.js by `npm run build`.
require('../dist/cli.js');
