#!/usr/bin/env node
import { run } from '../cli/run.js';
import { processIo } from '../cli/io.js';

process.exitCode = await run(process.argv.slice(2), processIo());
