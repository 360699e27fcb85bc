#!/usr/bin/env node
// Runs the TypeScript command line through tsx (a runtime dependency), so the same sources
// serve the CLI, the tests and the app without a build step.
import { register } from 'tsx/esm/api';

register();
await import('../src/cli/main.ts');
