import { UpdateTemplateItemSchema } from '../../shared/schemas/assets';

describe('template item updates', () => {
  it('when a PATCH names only the title, then no other field is filled with a default', () => {
    // zod 4 keeps defaults inside .partial(); the update schema must not reset fields left out.
    expect(UpdateTemplateItemSchema.parse({ title: 'Door seal check', version: 2 })).toEqual({ title: 'Door seal check', version: 2 });
  });

  it('when an unknown field is sent, then it is refused', () => {
    expect(UpdateTemplateItemSchema.safeParse({ title: 'x', version: 0, colour: 'red' }).success).toBe(false);
  });
});
