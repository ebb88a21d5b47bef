import computeMunkres from 'munkres-js';
import { readAssignment, squareCostMatrix } from '../../shared/domain/fleet';
import type { AssignmentSolution } from '../../shared/schemas/fleet';

/**
 * Minimum-cost assignment of rows to columns (the Hungarian method, through the `munkres-js`
 * package). Rows may outnumber columns or the reverse; `null` marks a forbidden pair. The matrix
 * is squared with one big cost for padding and forbidden cells (shared/domain/fleet), and pairs
 * that land on those cells are dropped, so a row with no allowed column left gets none.
 */
export function solveAssignment(costs: (number | null)[][]): AssignmentSolution {
  if (!costs.length || !costs[0].length) return { pairs: [], totalCost: 0 };
  const { matrix } = squareCostMatrix(costs);
  return readAssignment(costs, computeMunkres(matrix));
}
