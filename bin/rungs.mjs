#!/usr/bin/env node
// Launcher: study files are TypeScript, so the CLI runs under tsx's loader.
import { register } from 'tsx/esm/api';
register();
await import('../src/cli/main.ts');
