// Batches on the floor: the batch-level use of src/model, shared by the batch screen (preview) and the server.
// Imports only src/model, src/planning and src/contracts.
export * from './program';
export * from './calibration';
export * from './status';
export * from './deviations';
export * from './historian-csv';
export * from './local-time';
export * from './sample';
export * from './reading-check';
