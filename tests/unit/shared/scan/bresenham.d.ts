// bresenham@0.0.4 ships no type declarations; the traversal tests use it only as a reference.
declare module 'bresenham' {
  /** Cells of the 8-connected Bresenham line between two integer cells, in order. */
  function bresenham(x0: number, y0: number, x1: number, y1: number): { x: number; y: number }[];
  export default bresenham;
}
