import Link from "next/link";

export default function NotFound() {
  return (
    <div className="mx-auto max-w-lg px-6 py-16">
      <h1>Page not found</h1>
      <p className="mt-2 text-sm text-ink-600">There is no page at this address.</p>
      <p className="mt-4 text-sm">
        <Link href="/">Back to the overview</Link>
      </p>
    </div>
  );
}
