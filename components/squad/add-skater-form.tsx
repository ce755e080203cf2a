/** Add a skater profile (head coach): a name and, optionally, a group. */
import { useState } from 'react';

import { skaterCreateSchema, type Group } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useAddSkater } from '../../store/team';
import { Banner, Button, Card, ChoiceChips, Heading, TextField, useZodForm } from '../ui';

const nameOnly = skaterCreateSchema.pick({ displayName: true });
const NO_GROUP = 'none';

export function AddSkaterForm({ teamId, groups }: { teamId: string; groups: Group[] }) {
  const addSkater = useAddSkater(teamId);
  const form = useZodForm(nameOnly, { displayName: '' });
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
