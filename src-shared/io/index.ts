export * from './problem';
export * from './parseCellValue';
export * from './detectScale';
export * from './detectDelimiter';
export * from './tokenizeDelimited';
export * from './parseDelimited';
export * from './writeDelimited';
export * from './looksLong';
