/** Plain text with its http(s) addresses turned into links (only those: no other schemes). */
export function LinkedText({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"')]+)/g);
  return (
    <>
      {parts.map((part, i) => {
        if (i % 2 === 0) return part;
        // A sentence's full stop or comma after an address is not part of it.
        const [, url, trail] = /^(.*?)([.,;:!?]*)$/.exec(part)!;
        return (
          <span key={i}>
            <a href={url} className="break-all text-accent" rel="noreferrer">
              {url}
            </a>
            {trail}
          </span>
        );
      })}
    </>
  );
}
