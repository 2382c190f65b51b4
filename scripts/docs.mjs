#!/usr/bin/env node
// Regenerates docs/protocol.md from the schema (run after `npm run build`).
import { readFileSync, writeFileSync } from 'node:fs';
import { protocolReference } from '../dist/src/protocol/reference-doc.js';

const root = new URL('..', import.meta.url);
const schema = JSON.parse(readFileSync(new URL('schema/protocol.schema.json', root), 'utf8'));
writeFileSync(new URL('docs/protocol.md', root), protocolReference(schema));
