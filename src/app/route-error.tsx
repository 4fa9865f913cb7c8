import { isRouteErrorResponse, Link, useRouteError } from 'react-router';
import { ApiError } from '../lib/api-client';
import { paths } from '../config/paths';

export function RouteError() {
  const error = useRouteError();
  const message = isRouteErrorResponse(error)
    ? error.status === 404
      ? 'There is no page at this address.'
      : error.statusText
    : error instanceof ApiError || error instanceof Error
      ? error.message
      : 'Something went wrong.';
  return (
    <div role="alert" className="mx-auto max-w-xl space-y-4 p-6">
      <h1>That did not work</h1>
      <p>{message}</p>
      <Link className="underline" to={paths.home}>
        Back to the start
      </Link>
    </div>
  );
}
