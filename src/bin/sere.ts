#!/usr/bin/env node
import { run } from '../cli/run.js';
import { processIo } from '../cli/io.js';
import { cacheSettingsFrom } from '../cli/cache-settings.js';
import { configureDrawsCache } from '../uncertainty/draws-cache.js';

const io = processIo();
configureDrawsCache(cacheSettingsFrom(process.env, (line) => io.stderr(`${line}\n`)));
void run(process.argv.slice(2), io).then((code) => { process.exitCode = code; });
