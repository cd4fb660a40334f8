#!/usr/bin/env node
// Runs the compiled CLI; `npm ci` builds dist/ through the prepare script.
import { main } from '../dist/cli/main.js';

main(process.argv).then((status) => {
  process.exitCode = status;
});
