// The tool's version, shown by --version and written into every output.
export const version = '0.1.0';
