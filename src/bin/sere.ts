#!/usr/bin/env node
import { run } from '../cli/run.js';
import { processIo } from '../cli/io.js';
import { cacheSettingsFrom } from '../cli/cache-settings.js';
import { configureSampleCache } from '../uncertainty/sample-cache.js';

const io = processIo();
configureSampleCache(cacheSettingsFrom(process.env, (line) => io.stderr(`${line}\n`)));
void run(process.argv.slice(2), io).then((code) => { process.exitCode = code; });
