// Tool version written into every run folder's provenance; kept in step with package.json.
export const TOOL_VERSION = '0.1.0';
