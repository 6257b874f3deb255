#!/usr/bin/env node
// `npx plumbline` runs right after `npm ci`: from dist/ when compiled and
// fresh, otherwise from the TypeScript sources (see load-cli.mjs).
import { loadCli } from './load-cli.mjs';

const main = await loadCli();
process.exitCode = await main(process.argv.slice(2));
