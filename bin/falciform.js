#!/usr/bin/env node
// The command-line front end; the TypeScript is compiled to build/ by `npm install` (prepare).
import { run } from '../build/src/cli/main.js';

process.exitCode = await run(process.argv.slice(2));
