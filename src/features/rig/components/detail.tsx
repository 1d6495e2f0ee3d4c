/** One term and its value in a point's or a gear item's list of details (inside a `<dl>`). */
export function Detail({ term, value }: { term: string; value: string }) {
  return (
    <div>
      <dt className="text-muted">{term}</dt>
      <dd className="whitespace-pre-line">{value}</dd>
    </div>
  );
}
