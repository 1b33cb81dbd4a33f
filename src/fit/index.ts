// `rungs fit`: convergence analysis of a table of errors and quantities produced elsewhere.
export { fitTable, fitTableFile, readTableFile, type FitOptions, type FitOutcome } from './fit-table.ts';
export { analyseQuantity, type QuantityReport, type QuantityOptions } from '../analysis/quantities.ts';
export { formatQuantityReports, type QuantityTerminalOptions } from './quantity-terminal.ts';
export { parseExpectations, expectationFor, type Expectations } from './expectations.ts';
export { parseCsvRecords, parseCsvTable, type CsvRecord, type CsvTable } from '../csv/read.ts';
export { readFitData, type ColumnChoice, type FitData, type SeriesColumn } from './table.ts';
