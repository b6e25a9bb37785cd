import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { CheckboxField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { allEvents, useCreateEndpoint, type WebhookEvent } from '../api';
import { SecretNotice } from './secret-notice';

export function CreateEndpointForm() {
  const [url, setUrl] = useState('');
  const [description, setDescription] = useState('');
  const [events, setEvents] = useState<WebhookEvent[]>([...allEvents]);
  const create = useCreateEndpoint();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate({ url: url.trim(), events, description: description.trim() || null }, { onSuccess: () => setUrl('') });
  };
  const toggle = (ev: WebhookEvent) => setEvents((cur) => (cur.includes(ev) ? cur.filter((x) => x !== ev) : [...cur, ev]));
  return (
    <div className="space-y-3">
      {create.data && <SecretNotice secret={create.data.secret} url={create.data.url ?? ''} onDone={() => create.reset()} />}
      <form onSubmit={submit} className="space-y-3" aria-label="Add a webhook endpoint">
        <TextField label="URL" type="url" required value={url} onChange={(e) => setUrl(e.target.value)} placeholder="https://bridge.example.com/gridwright" hint="https, reachable on a public address." />
        <TextField label="Description" value={description} onChange={(e) => setDescription(e.target.value)} />
        <fieldset>
          <legend className="mb-1 text-xs font-medium text-ash-700">Events</legend>
          {allEvents.map((ev) => (
            <CheckboxField key={ev} label={ev} checked={events.includes(ev)} onChange={() => toggle(ev)} />
          ))}
        </fieldset>
        <ProblemAlert error={create.error} />
        <Button type="submit" variant="primary" disabled={create.isPending || events.length === 0}>
          Add endpoint
        </Button>
      </form>
    </div>
  );
}
