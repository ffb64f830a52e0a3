import pkg from '../../../package.json' with { type: 'json' };

/** The running build's version, from package.json. */
export const appVersion: string = pkg.version;
