import { Link } from 'react-router';
import { PageHeader } from '../ui/Page';

export function NotFoundPage() {
  return (
    <>
      <PageHeader title="No such page" context="The address does not match any page of Tacet." />
      <Link to="/" className="text-sm text-accent hover:underline">
        Go to the start page
      </Link>
    </>
  );
}
