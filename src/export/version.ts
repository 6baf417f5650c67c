/** Name and version written into every output file (kept equal to package.json by a test). */
export const TOOL_NAME = "twistline";
export const TOOL_VERSION = "0.1.0";
