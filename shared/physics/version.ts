/**
 * Version of the flight engine, stored with every fit so that a refit by a newer engine is
 * recognisable. Bump the minor for changed numbers, the major for changed meaning.
 */
export const ENGINE_VERSION = '1.2.0';
