#!/usr/bin/env node
// Entry point of the `nearcast` command: runs the TypeScript CLI through tsx so a fresh clone needs no build step.
import { register } from 'tsx/esm/api';

register();
await import('../src/cli/main.ts');
