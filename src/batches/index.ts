// Batches on the floor: the batch-level use of src/model, shared by the batch screen (preview) and the server.
// Imports only src/model, src/planning and src/contracts. Calibration (./calibration) is the server's and is
// imported by its path, so the web app's bundle does not carry the calibration engine.
export * from './program';
export * from './status';
export * from './deviations';
export * from './historian-csv';
export * from './local-time';
export * from './sample';
export * from './reading-check';
