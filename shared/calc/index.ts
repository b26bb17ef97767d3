/** Measured-rule engine and trade calculations, shared by the screens and the server. */
export * from './quantity';
export * from './limits';
export * from './rules';
export * from './condensate';
export * from './refrigerant';
export * from './electrical';
export * from './clearance';
export * from './supports';
export * from './itemRules';
