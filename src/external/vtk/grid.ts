/** One point-data or cell-data array of a VTK file. */
export interface VtkPointArray {
  name: string;
  components: number;
  values: Float64Array;
  /** Line where the array starts. */
  line: number;
}

/** An unstructured grid as read from a VTK file (legacy or XML), before it becomes a rungs Mesh. */
export interface VtkGrid {
  file: string;
  nPoints: number;
  /** nPoints * 3 coordinates (VTK always stores three). */
  points: Float64Array;
  nCells: number;
  /** nCells + 1 start offsets into connectivity. */
  offsets: Int32Array;
  connectivity: Int32Array;
  /** Line of each connectivity entry, for messages. */
  connectivityLines: Int32Array;
  types: Int32Array;
  /** Line of each cell type entry, for messages. */
  typeLines: Int32Array;
  pointData: VtkPointArray[];
  /** Cell data: nCells × components values per array (the legacy reader leaves it empty: it skips CELL_DATA). */
  cellData: VtkPointArray[];
  /** Line the file ends on, for messages about something missing. */
  endLine: number;
}
