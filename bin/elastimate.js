#!/usr/bin/env node
// Tiny shim: runs the compiled CLI (built by `npm install` through the prepare script).
import { main } from '../dist/cli/main.js';

main(process.argv).then(
  (code) => {
    process.exitCode = code;
  },
  (err) => {
    process.stderr.write(`elastimate: internal error: ${err && err.message ? err.message : String(err)}\n`);
    process.exitCode = 1;
  },
);
