/** The tool's name and version, written into every output. Kept in step with package.json by a test. */
export const TOOL = { name: 'plumbline', version: '0.1.0' } as const;
