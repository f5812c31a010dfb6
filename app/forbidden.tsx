import Link from "next/link";

export default function Forbidden() {
  return (
    <div className="mx-auto max-w-lg px-6 py-16" data-testid="forbidden">
      <h1>Not available to your role</h1>
      <p className="mt-2 text-sm text-ink-600">
        Your role does not include this part of Bellwether. If you need it for your work, ask your administrator.
      </p>
      <p className="mt-4 text-sm">
        <Link href="/">Back to the overview</Link>
      </p>
    </div>
  );
}
