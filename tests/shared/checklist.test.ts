import { checklistProgress } from '../../shared/domain/checklist';
import type { ItemState } from '../../shared/schemas/assets';

const items = (spec: Array<[ItemState, boolean]>) => spec.map(([state, requiredForGate]) => ({ state, requiredForGate }));

// PRODUCT.md section 4, part C: required items passed or not applicable / required items. "Done"
// here is the same rule over all items; deviations are counted apart (the product's own choice).
describe('checklist progress (PRODUCT.md section 4, part C)', () => {
  it.each([
    { label: 'an empty checklist', spec: [], expected: { total: 0, done: 0, requiredTotal: 0, requiredDone: 0, deviations: 0 } },
    {
      label: 'passed and not applicable count as done, open does not',
      spec: [['passed', true], ['not-applicable', true], ['open', true]],
      expected: { total: 3, done: 2, requiredTotal: 3, requiredDone: 2, deviations: 0 },
    },
    {
      label: 'a deviation is not done and is counted',
      spec: [['deviation', true], ['passed', true]],
      expected: { total: 2, done: 1, requiredTotal: 2, requiredDone: 1, deviations: 1 },
    },
    {
      label: 'items not required for the gate count in total only',
      spec: [['passed', false], ['open', false], ['passed', true], ['deviation', false]],
      expected: { total: 4, done: 2, requiredTotal: 1, requiredDone: 1, deviations: 1 },
    },
  ] as Array<{ label: string; spec: Array<[ItemState, boolean]>; expected: object }>)('when $label, then the counts follow', ({ spec, expected }) => {
    expect(checklistProgress(items(spec))).toEqual(expected);
  });
});
