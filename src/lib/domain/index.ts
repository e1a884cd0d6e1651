/**
 * The measurement engine: pure, isomorphic functions on plain numbers in SI base units
 * (Ω, V, A, m, Pa, °C). No I/O and no framework imports, so the same verdict is computed on
 * the phone offline and again on the server.
 */
export * from './units';
export * from './meter';
export * from './temperature';
export * from './spec';
export * from './compare';
export * from './spark';
export * from './vin';
export * from './battery';
