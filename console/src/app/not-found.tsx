import { Link } from 'react-router-dom';

export function NotFoundRoute() {
  return (
    <div className="mx-auto mt-16 max-w-md text-center">
      <p className="text-sm font-semibold">No page here</p>
      <p className="mt-1 text-sm text-ash-500">
        The address does not match any console page. <Link to="/" className="text-kiln-700 underline">Go to the start</Link>.
      </p>
    </div>
  );
}
