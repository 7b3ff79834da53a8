/** Stored with every analysis run so that a result can be traced to the code that computed it. */
export const ENGINE_VERSION = '0.1.0';
