import { isApiError } from '../../../lib/apiClient';
import { formatDateTime } from '../../../lib/format';
import { PageHeader } from '../../../ui/Page';
import { Empty, ErrorState, Loading } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { useOutbox } from '../api/outbox';
import { MessageText } from '../components/MessageText';

export function OutboxPage() {
  const canManage = useCan('manageTeam');
  const outbox = useOutbox();

  return (
    <>
      <PageHeader
        title="Outbox"
        context="E-mail the development server would have sent for this team: invitations, password resets, run notices. Newest first."
      />
      {!canManage ? (
        <Empty>Only owners of this team read its outbox.</Empty>
      ) : outbox.isPending ? (
        <Loading label="Loading messages" />
      ) : outbox.isError ? (
        isApiError(outbox.error, 404) ? (
          <Empty>This server runs in production mode and sends real e-mail, so it keeps no outbox.</Empty>
        ) : (
          <ErrorState error={outbox.error} onRetry={() => outbox.refetch()} />
        )
      ) : outbox.data.length === 0 ? (
        <Empty>No messages yet. Invitations and password resets will appear here.</Empty>
      ) : (
        <ol className="flex flex-col" aria-label="Messages">
          {outbox.data.map((message) => (
            <li key={message.id} className="border-t border-rule py-5 first:border-t-0 first:pt-0">
              <article aria-label={message.subject}>
                <header className="mb-3 flex flex-wrap items-baseline justify-between gap-x-6 gap-y-1">
                  <h2 className="font-medium">{message.subject}</h2>
                  <p className="text-sm text-ink-soft">
                    to {message.to} · <span className="figures">{formatDateTime(message.createdAt)}</span>
                  </p>
                </header>
                <div className="border-l-2 border-rule pl-4">
                  <MessageText text={message.text} />
                </div>
              </article>
            </li>
          ))}
        </ol>
      )}
    </>
  );
}
