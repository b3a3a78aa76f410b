import packageJson from '../package.json' with { type: 'json' };

/** The tool version, written into every fit and forecast so a record says what made it. */
export const TOOL_VERSION: string = packageJson.version;
