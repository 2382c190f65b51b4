/** The one set of Ajv options every schema is compiled with, at build time and at run time alike. */
export const AJV_OPTIONS = { allErrors: true, verbose: true, strict: true, strictRequired: false, allowUnionTypes: true } as const;

/** Where the build writes a schema's precompiled validator, relative to the package root. */
export function compiledValidatorPath(name: string): string {
  return `dist/validators/${name.replace(/\.json$/, '.cjs')}`;
}
