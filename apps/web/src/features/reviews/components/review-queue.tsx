import { Link } from 'react-router-dom';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { useReviewQueue } from '../api/get-review-queue';

export function waiting(minutes: number): string {
  if (minutes < 60) return `${minutes} min`;
  const h = Math.floor(minutes / 60);
  return h < 48 ? `${h} h ${minutes % 60} min` : `${Math.floor(h / 24)} days`;
}

/** The reviewers' queue: submitted plans, oldest first. */
export function ReviewQueue() {
  const queue = useReviewQueue();
  return (
    <div className="space-y-4">
      <h1 className="text-xl font-semibold text-tide-900">Review queue</h1>
      <Panel title="Plans awaiting countersignature (oldest first)">
        {queue.isLoading && <Loading what="the queue" />}
        {queue.error ? <ErrorMessage error={queue.error} /> : null}
        {queue.data && queue.data.items.length === 0 && <Empty>No plan is waiting.</Empty>}
        {queue.data && queue.data.items.length > 0 && (
          <table className="w-full text-left text-sm">
            <thead>
              <tr className="text-xs text-slate-500">
                <th>Patient</th>
                <th>Ward</th>
                <th>Drug</th>
                <th>Author</th>
                <th>Waiting</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {queue.data.items.map((item) => (
                <tr key={item.planId} data-testid="queue-row" className="border-t border-slate-100">
                  <td>{item.patientName}</td>
                  <td>{item.ward ?? '—'}</td>
                  <td>{item.drug}</td>
                  <td>{item.authorName}</td>
                  <td>{waiting(item.waitingMinutes)}</td>
                  <td>
                    {item.mayReview ? (
                      <Link
                        className="font-medium text-tide-700 underline"
                        to={paths.reviewPlan.getHref(item.planId)}
                      >
                        Review
                      </Link>
                    ) : (
                      <span className="text-xs text-slate-500">your plan</span>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Panel>
    </div>
  );
}
