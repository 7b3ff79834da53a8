import { ErrorNote } from '../../shared/components.tsx';
import { useQuery } from '../../shared/use-command.ts';

/**
 * The printable packet of one round: what the experts are asked, the construct and facet
 * definitions, the rating scale, and the items with space for the answers. Print it from the
 * browser (or save it as PDF); the app's navigation is left off the printed page.
 */
export function ReviewPacket({ roundId }: { roundId: number }) {
  const packet = useQuery('review.packet', { roundId });
  const log = useQuery('log.list', { limit: 1 });
  if (packet.error) return <ErrorNote message={packet.error} />;
  if (!packet.data) return <p className="loading">Loading…</p>;
  const p = packet.data;
  const { form } = p;
  const scale = p.anchors.map((a) => a.value);
  return (
    <div className="packet-screen">
      <div className="packet-toolbar no-print">
        <a href="#/phase/review">← Back to the expert review</a>
        <button type="button" className="primary" onClick={() => window.print()}>
          Print…
        </button>
      </div>
      <article className="review-packet">
        <header className="packet-head">
          <p className="eyebrow">
            Expert review · round {p.round.number}
            {p.round.label && ` · ${p.round.label}`}
          </p>
          <h1>{p.construct.name || 'The construct'}: rating the items</h1>
          {p.studyTitle && <p className="muted">{p.studyTitle}</p>}
          <p className="packet-fill">
            Your expert code: <span className="blank" /> Date: <span className="blank short" />
          </p>
        </header>
        {form.instructions && (
          <section>
            <h2>What we ask of you</h2>
            <p>{form.instructions}</p>
          </section>
        )}
        <section>
          <h2>The construct</h2>
          <p>{p.construct.definition}</p>
          {p.construct.population && (
            <p>
              <strong>Population:</strong> {p.construct.population}
            </p>
          )}
          <h3>Its facets</h3>
          <dl className="packet-facets">
            {p.facets.map((f) => (
              <div key={f.name}>
                <dt>{f.name}</dt>
                <dd>{f.definition}</dd>
              </div>
            ))}
          </dl>
        </section>
        <section>
          <h2>How to rate</h2>
          <p>
            <strong>Relevance</strong> of each item to the construct:{' '}
            {p.anchors.map((a, i) => (
              <span key={a.value}>
                {i > 0 && ' · '}
                <strong>{a.value}</strong> {a.label}
              </span>
            ))}
            .
          </p>
          {form.asksEssential && (
            <p>
              <strong>Is the item essential?</strong> Mark E ({p.essentialAnswers[0]}), U (
              {p.essentialAnswers[1]}) or N ({p.essentialAnswers[2]}).
            </p>
          )}
          {form.asksFacet && (
            <p>
              <strong>Facet:</strong> write the facet you think the item belongs to. The items are mixed on
              purpose, so their order does not suggest a facet.
            </p>
          )}
          {form.asksComment && (
            <p>
              <strong>Comment:</strong> anything about the wording, or content you miss.
            </p>
          )}
        </section>
        {p.sections.map((section) => (
          <section key={section.facet ?? 'items'} className="packet-items">
            <h2>{section.facet ? `Items: ${section.facet}` : 'Items'}</h2>
            <table className="packet-table">
              <thead>
                <tr>
                  <th className="num">No.</th>
                  <th>Item</th>
                  <th className="answer">Relevance</th>
                  {form.asksEssential && <th className="answer">Essential</th>}
                  {form.asksFacet && <th className="facet-answer">Facet</th>}
                  {form.asksComment && <th className="comment-answer">Comment</th>}
                </tr>
              </thead>
              <tbody>
                {section.items.map((it) => (
                  <tr key={it.code}>
                    <td className="num">
                      {it.number}
                      {p.showCodes && <span className="packet-code">{it.code}</span>}
                    </td>
                    <td>{it.text}</td>
                    <td className="answer">
                      {scale.map((v) => (
                        <span key={v} className="box">
                          {v}
                        </span>
                      ))}
                    </td>
                    {form.asksEssential && (
                      <td className="answer">
                        {['E', 'U', 'N'].map((v) => (
                          <span key={v} className="box">
                            {v}
                          </span>
                        ))}
                      </td>
                    )}
                    {form.asksFacet && <td className="facet-answer" />}
                    {form.asksComment && <td className="comment-answer" />}
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
        ))}
        <footer className="packet-foot">
          Please return your answers with one line per item
          {p.showCodes
            ? ', naming each item by the code under its number'
            : ', naming each item by its number'}
          : relevance{form.asksEssential && ', essential'}
          {form.asksFacet && ', facet'}
          {form.asksComment && ', comment'}. Thank you.
          {log.data?.head && (
            <p className="packet-head-record">
              Printed from the study whose decision log ended at <code>{log.data.head}</code>; the study can
              show at any time that its log still holds this row.
            </p>
          )}
        </footer>
      </article>
    </div>
  );
}
