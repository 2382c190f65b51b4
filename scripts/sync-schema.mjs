#!/usr/bin/env node
// Writes the parts of schema/protocol.schema.json that the registries describe (model kinds and
// options, split rules, preprocessing steps, metric names) from the entries themselves (run after
// `npm run build`; `npm run docs` runs it).
import { readFileSync, writeFileSync } from 'node:fs';
import { withRegistryParts } from '../dist/src/protocol/registry-schema.js';

const file = new URL('../schema/protocol.schema.json', import.meta.url);
const schema = JSON.parse(readFileSync(file, 'utf8'));
writeFileSync(file, JSON.stringify(withRegistryParts(schema), null, 2) + '\n');
