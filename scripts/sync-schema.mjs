#!/usr/bin/env node
// Writes the parts of schema/protocol.schema.json that the registries describe (the model kinds
// and their options) from the entries themselves (run after `npm run build`; `npm run docs` runs it).
import { readFileSync, writeFileSync } from 'node:fs';
import { modelSchema } from '../dist/src/model/registry.js';

const file = new URL('../schema/protocol.schema.json', import.meta.url);
const schema = JSON.parse(readFileSync(file, 'utf8'));
schema.properties.model = modelSchema();
writeFileSync(file, JSON.stringify(schema, null, 2) + '\n');
