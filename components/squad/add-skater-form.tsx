/**
 * Add a skater profile (head coach): a name and, optionally, a group. A name the squad already has
 * (any letter case, retired skaters included) is refused on the field before anything is sent;
 * the server's 409 for a name added meanwhile lands on the same field.
 */
import { useMemo, useState } from 'react';
import { z } from 'zod';

import { displayNameSchema, type Group, type Skater } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useAddSkater } from '../../store/team';
import { Banner, Button, Card, ChoiceChips, Heading, TextField, useZodForm } from '../ui';
import { skaterNameProblem } from './duplicates';

const NO_GROUP = 'none';

export function AddSkaterForm({ teamId, groups, skaters = [] }: { teamId: string; groups: Group[]; skaters?: Skater[] }) {
  const addSkater = useAddSkater(teamId);
  const schema = useMemo(
    () =>
      z.object({
        displayName: displayNameSchema.superRefine((value, ctx) => {
          const message = skaterNameProblem(skaters, value);
          if (message) ctx.addIssue({ code: 'custom', message });
        }),
      }),
    [skaters],
  );
  const form = useZodForm(schema, { displayName: '' });
  const [groupId, setGroupId] = useState<string>(NO_GROUP);
  const [added, setAdded] = useState<string | null>(null);
  // form.submit ignores a second tap while the first is being saved: one skater per double tap.
  const onSubmit = () =>
    form.submit(async ({ displayName }) => {
      setAdded(null);
      try {
        const skater = await addSkater.mutateAsync({ displayName, groupId: groupId === NO_GROUP ? null : groupId });
        form.reset();
        setAdded(skater.displayName);
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not add the skater. Try again.' });
      }
    });

  const choices = [
    { value: NO_GROUP, label: 'No group', testID: 'squad-add-skater-group-none' },
    ...groups.map((g) => ({ value: g.id, label: g.name, testID: `squad-add-skater-group-${g.id}` })),
  ];

  return (
    <Card testID="squad-add-skater">
      <Heading level={2}>Add a skater</Heading>
      {added ? (
        <Banner kind="success" testID="squad-add-skater-done">
          {`${added} is on the squad.`}
        </Banner>
      ) : null}
      {form.formError ? (
        <Banner kind="error" testID="squad-add-skater-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="Skater's name"
        testID="squad-add-skater-name"
        autoCapitalize="words"
        onSubmitEditing={onSubmit}
        {...form.field('displayName')}
      />
      {groups.length > 0 ? (
        <ChoiceChips label="Group" choices={choices} value={groupId} onChange={setGroupId} testID="squad-add-skater-group" />
      ) : null}
      <Button
        label={addSkater.isPending ? 'Adding…' : 'Add skater'}
        testID="squad-add-skater-submit"
        onPress={onSubmit}
        loading={addSkater.isPending}
      />
    </Card>
  );
}
