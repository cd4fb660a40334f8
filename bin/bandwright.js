#!/usr/bin/env node
// Runs the compiled CLI; `npm ci` builds dist/ through the prepare script.
import { runAsProcess } from '../dist/cli/main.js';

runAsProcess(process.argv);
