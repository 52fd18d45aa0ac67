#!/usr/bin/env node
// Entry point of the `certa` command: the compiled CLI lives in dist/ (built by `npm run build`,
// which `npm ci` runs through the prepare script).
import { main } from '../dist/cli/main.js';

main(process.argv).then((code) => {
  process.exitCode = code;
});
