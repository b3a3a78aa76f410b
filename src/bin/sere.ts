#!/usr/bin/env node
import { run } from '../cli/run.js';
import { processIo } from '../cli/io.js';

void run(process.argv.slice(2), processIo()).then((code) => { process.exitCode = code; });
