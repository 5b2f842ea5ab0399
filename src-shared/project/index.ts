export * from './projectSchema';
export * from './projectDocument';
export * from './projectFile';
export * from './locateJsonPath';
