import type { ToolInfo } from '../manifest/build.js';
import { packageVersion } from '../io/package-root.js';

export function toolInfo(): ToolInfo {
  return { name: 'foldseal', version: packageVersion(), node: process.version, platform: `${process.platform}-${process.arch}` };
}
