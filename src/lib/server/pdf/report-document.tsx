/**
 * The assessment report as a react-pdf document: Latchwell's own layout. Page one carries the
 * verdict in plain words and the facts of the visit; then the area scores, the findings by
 * severity, drawings, photos, the cautions the owner acknowledges, the disclaimer, the ruleset
 * and document identity, and the signature blocks (filled in on the signed document).
 */
import { Document, Image, Page, Path, Svg, Text, View } from '@react-pdf/renderer';
import type { ReactElement } from 'react';
import { fingerprintInWords } from './certificate-facts';
import { ForceTracePlot, SwingGeometryDiagram } from './diagrams';
import {
  DISCLAIMER,
  verdictWords,
  type ReportModel,
  type ReportPhoto,
  type StoredFinding,
} from './report-model';
import { SEVERITY_LABEL, formatAsEntered, formatLimit } from '@/lib/vocabulary';
import { styles } from './styles';
import { colours, severityColour, verdictColour } from './theme';
import { factLabel, formatDate, formatDateTime, formatObserved, formatQuantity, pdfText } from './text';

const kindBanner = {
  preview: 'Preview - not for signature',
  signing_copy: 'Copy for signature',
  signed_report: 'Signed report',
} as const;

export function ReportDocument({ model }: { model: ReportModel }): ReactElement {
  const units = model.organisation.displayUnits;
  const verdict = verdictWords[model.result.verdict];
  const title = `Gate safety assessment - ${model.gate.label}`;
  return (
    <Document
      title={pdfText(title)}
      author={pdfText(model.organisation.name)}
      subject={`Assessment ${model.assessment.id}`}
      creator="Latchwell"
      producer="Latchwell"
      keywords={`latchwell document ${model.documentId}${model.signing?.auditHead ? ` audit-head ${model.signing.auditHead.eventId}:${model.signing.auditHead.hash}` : ''}`}
    >
      <Page size="LETTER" style={styles.page}>
        <Chrome model={model} />
        <Text style={styles.label}>{pdfText(model.organisation.name)}</Text>
        <Text style={styles.h1}>Gate safety assessment</Text>
        <Text style={styles.muted}>
          {pdfText(`${model.gate.label} at ${model.site.name ?? model.site.lines[0] ?? 'the site'}`)}
        </Text>

        <View style={[styles.verdictBox, { backgroundColor: verdictColour[model.result.verdict] }]}>
          <Text style={[styles.label, { color: colours.white }]}>Verdict</Text>
          <Text style={styles.verdictLabel}>{verdict.label}</Text>
          <Text style={{ fontWeight: 700, marginTop: 2 }}>{verdict.headline}</Text>
          <Text style={{ marginTop: 2 }}>{verdict.meaning}</Text>
        </View>
        {!model.result.complete ? (
          <Text style={[styles.small, { marginTop: 4, color: colours.remedy }]}>
            Some checks could not be completed for lack of information; they are listed in this report.
          </Text>
        ) : null}

        <View style={styles.factGrid}>
          <Fact label="Site" value={[model.site.name, ...model.site.lines].filter(Boolean).join(', ')} />
          <Fact
            label="Gate"
            value={`${model.gate.label}: ${model.gate.kind.replace(/_/g, ' ')}, ${model.gate.leaves} leaf${gateSize(model, units)}`}
          />
          <Fact
            label="Date of visit"
            value={formatDate(
              model.assessment.visitedOn ?? model.assessment.submittedAt,
              model.organisation.timeZone,
            )}
          />
          <Fact label="Auditor" value={model.auditor.name} />
          <Fact label="Organisation" value={model.organisation.name} />
          <Fact label="Client" value={model.client.name} />
          <Fact label="Purpose" value={model.assessment.purpose} />
          <Fact label="Summary" value={summaryLine(model)} />
        </View>

        <View wrap={false}>
          <Text style={styles.h2}>Scores by hazard area</Text>
          <AreaBars model={model} />
        </View>
      </Page>

      <Page size="LETTER" style={styles.page}>
        <Chrome model={model} />
        {/* Each heading is kept on one page with the first thing under it (a View that does not wrap). */}
        <View wrap={false}>
          <Text style={styles.h2}>What needs fixing</Text>
          {model.failing.length === 0 ? <Text>No check failed.</Text> : null}
          {model.failing.slice(0, 1).map((finding) => (
            <FindingCard key={finding.ruleId} finding={finding} photos={finding.photos} model={model} />
          ))}
        </View>
        {model.failing.slice(1).map((finding) => (
          <FindingCard key={finding.ruleId} finding={finding} photos={finding.photos} model={model} />
        ))}

        {model.needsInfo.length ? (
          <View>
            {model.needsInfo.map((f, i) => {
              const item = (
                <View key={f.ruleId} style={{ marginBottom: 4 }} wrap={false}>
                  <Text style={{ fontWeight: 600 }}>{pdfText(f.title)}</Text>
                  <Text style={styles.small}>
                    Missing:{' '}
                    {pdfText(
                      f.missing.map((m) => m.prompt || factLabel(m.key)).join('; ') || 'details not recorded',
                    )}
                  </Text>
                </View>
              );
              return i === 0 ? (
                <View key={f.ruleId} wrap={false}>
                  <Text style={styles.h2}>Checks that need more information</Text>
                  {item}
                </View>
              ) : (
                item
              );
            })}
          </View>
        ) : null}

        {model.assessment.swingGeometry || model.forceTraces.length ? (
          <View wrap={false}>
            <Text style={styles.h2}>Measurements</Text>
            {model.assessment.swingGeometry ? (
              <SwingGeometryDiagram
                geometry={model.assessment.swingGeometry}
                formatLength={(mm) => formatQuantity(mm, 'mm', units)}
              />
            ) : (
              <ForceTracePlot
                trace={model.forceTraces[0]}
                formatForce={(n) => formatQuantity(n, 'N', units)}
              />
            )}
          </View>
        ) : null}
        {model.forceTraces.slice(model.assessment.swingGeometry ? 0 : 1).map((trace) => (
          <ForceTracePlot
            key={trace.itemKey + trace.label}
            trace={trace}
            formatForce={(n) => formatQuantity(n, 'N', units)}
          />
        ))}

        {model.otherPhotos.length ? (
          <View wrap={false}>
            <Text style={styles.h2}>Further photos</Text>
            <Photos photos={model.otherPhotos.slice(0, MAX_PHOTOS_IN_CARD)} model={model} />
          </View>
        ) : null}
        {chunks(model.otherPhotos.slice(MAX_PHOTOS_IN_CARD), MAX_PHOTOS_IN_CARD).map((group, i) => (
          <View key={i} wrap={false}>
            <Photos photos={group} model={model} />
          </View>
        ))}

        <View wrap={false}>
          <Text style={styles.h2}>Checks passed</Text>
          <Text style={styles.small}>
            {model.passed.length} checks passed
            {model.notApplicable ? `; ${model.notApplicable} did not apply to this gate` : ''}.
          </Text>
          {model.passed.slice(0, 3).map((f) => (
            <Text key={f.ruleId} style={styles.small}>
              {pdfText(`${f.title} (${referenceText(f)})`)}
            </Text>
          ))}
        </View>
        {model.passed.slice(3).map((f) => (
          <Text key={f.ruleId} style={styles.small}>
            {pdfText(`${f.title} (${referenceText(f)})`)}
          </Text>
        ))}
      </Page>

      <Page size="LETTER" style={styles.page}>
        <Chrome model={model} />
        <Text style={styles.h2}>Cautions for the owner</Text>
        {model.cautions.length === 0 ? (
          <Text>There are no cautions to acknowledge beyond keeping the gate maintained and inspected.</Text>
        ) : (
          <Text style={[styles.small, { marginBottom: 6 }]}>
            Until the fixes are done, please read and acknowledge each of these.{' '}
            {model.signing ? 'Each was ticked by the signer.' : ''}
          </Text>
        )}
        {model.cautions.map((c) => (
          <View key={c.ruleId} style={styles.caution} wrap={false}>
            <CautionBox ticked={Boolean(model.signing)} />
            <View style={{ flex: 1 }}>
              <Text style={{ fontWeight: 700 }}>{pdfText(c.title)}</Text>
              <Text>{pdfText(c.caution)}</Text>
            </View>
          </View>
        ))}

        <View style={styles.disclaimer} wrap={false}>
          <Text style={styles.h3}>What this report is, and is not</Text>
          <Text>{DISCLAIMER}</Text>
        </View>

        <View wrap={false}>
          <Text style={styles.h2}>Signatures</Text>
          <SignatureBlocks model={model} />
        </View>

        <View wrap={false}>
          <Text style={styles.h2}>Record</Text>
          <Identity model={model} />
        </View>
      </Page>
    </Document>
  );
}

function Chrome({ model }: { model: ReportModel }) {
  return (
    <>
      <View style={styles.header} fixed>
        <Text style={styles.brandMark}>LATCHWELL</Text>
        <Text>{pdfText(`${model.organisation.name} · ${kindBanner[model.kind]}`)}</Text>
      </View>
      <Text style={styles.footerLeft} fixed>
        {`Document ${model.documentId} · ${pdfText(model.ruleset.title)} ${model.ruleset.version}`}
      </Text>
      <Text
        style={styles.footerRight}
        fixed
        render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`}
      />
    </>
  );
}

function Fact({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.fact}>
      <Text style={styles.label}>{label}</Text>
      <Text>{pdfText(value || '-')}</Text>
    </View>
  );
}

/** Width × height as entered on the gate form ("12 ft × 6 ft"); converted only when nothing was kept. */
function gateSize(model: ReportModel, units: 'imperial' | 'metric'): string {
  const width =
    model.gate.entered?.width ?? (model.gate.widthMm ? { value: model.gate.widthMm, unit: 'mm' } : null);
  const height =
    model.gate.entered?.height ?? (model.gate.heightMm ? { value: model.gate.heightMm, unit: 'mm' } : null);
  const shown = (m: { value: number; unit: string }, entered: boolean) =>
    entered ? formatAsEntered(m) : formatQuantity(m.value, 'mm', units);
  const parts = [
    width ? shown(width, Boolean(model.gate.entered?.width)) : null,
    height ? shown(height, Boolean(model.gate.entered?.height)) : null,
  ].filter(Boolean);
  if (!parts.length) return '';
  return width && height
    ? `, ${parts.join(' × ')} (width × height)`
    : `, ${parts[0]} ${width ? 'wide' : 'high'}`;
}

function summaryLine(model: ReportModel): string {
  const count = (s: string) => model.failing.filter((f) => f.severity === s).length;
  return `${count('critical')} critical, ${count('major')} major and ${count('minor')} minor hazards; ${model.passed.length} checks passed; ${model.needsInfo.length} need information.`;
}

function AreaBars({ model }: { model: ReportModel }) {
  return (
    <View>
      {model.areas.map((area) => {
        const score = area.score;
        const colour =
          score === null
            ? colours.iron200
            : score >= 90
              ? colours.clear
              : score >= 60
                ? colours.remedy
                : colours.withdraw;
        return (
          <View
            key={area.key}
            style={{
              flexDirection: 'row',
              alignItems: 'center',
              marginBottom: 5,
            }}
            wrap={false}
          >
            <Text style={{ width: 150 }}>{pdfText(area.title)}</Text>
            <View
              style={{
                flex: 1,
                height: 9,
                backgroundColor: colours.iron100,
                borderRadius: 2,
              }}
            >
              {score === null ? null : (
                <View
                  style={{
                    width: `${Math.max(0, Math.min(100, score))}%`,
                    height: 9,
                    backgroundColor: colour,
                    borderRadius: 2,
                  }}
                />
              )}
            </View>
            <Text style={{ width: 60, textAlign: 'right' }}>
              {score === null ? 'not scored' : `${Math.round(score)} / 100`}
            </Text>
          </View>
        );
      })}
      <Text style={[styles.small, styles.muted, { marginTop: 2 }]}>
        100 means every applicable check in the area passed; failures weigh by severity.
      </Text>
    </View>
  );
}

function referenceText(f: StoredFinding): string {
  return [f.reference.standard, f.reference.clause].filter(Boolean).join(', ') || 'no reference recorded';
}

function FindingCard({
  finding,
  photos,
  model,
}: {
  finding: StoredFinding;
  photos: ReportPhoto[];
  model: ReportModel;
}) {
  const units = model.organisation.displayUnits;
  const observed = Object.entries(finding.observed)
    .slice(0, 8)
    .map(
      ([k, v]) => `${factLabel(k)}: ${formatObserved(k, v, units, model.assessment.measurementsAsEntered)}`,
    );
  const limits = Object.entries(finding.params)
    .filter(
      ([, p]) => typeof p.value === 'number' || typeof p.value === 'string' || typeof p.value === 'boolean',
    )
    .slice(0, 4)
    .map(
      ([k, p]) =>
        `${factLabel(k)}: ${typeof p.value === 'number' ? formatLimit(p.value, p.unit, units) : formatObserved(k, p.value, units)}`,
    );
  // A finding and its photos stay on one page: the whole card moves to the next page rather
  // than leave a photo apart from the words it shows. Many photos get smaller so they fit.
  const kept = photos.slice(0, MAX_PHOTOS_IN_CARD);
  const more = photos.slice(MAX_PHOTOS_IN_CARD);
  return (
    <>
      <View
        wrap={false}
        style={[
          styles.card,
          {
            borderLeftWidth: 3,
            borderLeftColor: severityColour[finding.severity],
          },
        ]}
      >
        <View>
          <View style={styles.findingHead}>
            <Text style={[styles.h3, { flex: 1 }]}>{pdfText(finding.title)}</Text>
            <Text style={[styles.pill, { backgroundColor: severityColour[finding.severity] }]}>
              {SEVERITY_LABEL[finding.severity]}
            </Text>
          </View>
          <Text style={[styles.small, styles.muted, { marginBottom: 3 }]}>
            {pdfText(
              `${model.ruleset.areaTitles[finding.area] ?? finding.area} · ${finding.ruleId}${finding.hrn ? ` · HRN ${finding.hrn.value} (${finding.hrn.band})` : ''}`,
            )}
          </Text>
          <Field
            name="What was found"
            value={observed.length ? observed.join('; ') : 'The check failed on the answers given.'}
          />
          {limits.length ? <Field name="Judged against" value={limits.join('; ')} /> : null}
          <Field name="Why it matters" value={finding.caution || '-'} />
          <Field name="Fix" value={finding.remediation || '-'} />
          <Field
            name="Reference"
            value={referenceText(finding) + (finding.reference.note ? ` (${finding.reference.note})` : '')}
          />
        </View>
        {kept.length ? <Photos photos={kept} model={model} /> : null}
      </View>
      {chunks(more, MAX_PHOTOS_IN_CARD).map((group, i) => (
        <View
          key={i}
          wrap={false}
          style={[styles.card, { borderLeftWidth: 3, borderLeftColor: severityColour[finding.severity] }]}
        >
          <Text style={styles.h3}>{pdfText(`${finding.title}: more photos`)}</Text>
          <Photos photos={group} model={model} />
        </View>
      ))}
    </>
  );
}

/** Beyond this many photos a finding continues in a card of its own that repeats its title. */
const MAX_PHOTOS_IN_CARD = 15;

function chunks<T>(items: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

/** Photo width (points) by how many share a card: three, four or five to a row. */
function photoWidth(count: number): number {
  return count <= 3 ? 150 : count <= 8 ? 118 : 92;
}

/**
 * The box before a caution; ticked once the owner signed. The tick is drawn, not typed: the
 * report's font (Noto Sans) has no check-mark glyph.
 */
function CautionBox({ ticked }: { ticked: boolean }) {
  return (
    <View style={styles.box}>
      {ticked ? (
        <Svg width={8} height={8} viewBox="0 0 10 10">
          <Path d="M1.5 5.2 L4 7.8 L8.8 2" stroke={colours.iron900} strokeWidth={1.8} fill="none" />
        </Svg>
      ) : null}
    </View>
  );
}

function Field({ name, value }: { name: string; value: string }) {
  return (
    <View style={[styles.row, { marginTop: 1.5 }]}>
      <Text style={styles.fieldName}>{name}</Text>
      <Text style={styles.fieldValue}>{pdfText(value)}</Text>
    </View>
  );
}

function Photos({ photos, model }: { photos: ReportPhoto[]; model: ReportModel }) {
  return (
    <View style={styles.photoRow}>
      {photos.map((photo, i) => {
        const width = photoWidth(photos.length);
        const height = Math.min(width, (width * photo.height) / Math.max(1, photo.width));
        return (
          <View key={`${photo.itemKey}-${i}`} style={[styles.photo, { width }]} wrap={false}>
            <Image src={photo.data} style={{ width, height, objectFit: 'cover' }} />
            <Text style={styles.mono}>
              {pdfText(
                [
                  photo.caption,
                  photo.takenAt ? formatDateTime(photo.takenAt, model.organisation.timeZone) : null,
                ]
                  .filter(Boolean)
                  .join(' · ') || photo.itemKey,
              )}
            </Text>
          </View>
        );
      })}
    </View>
  );
}

function SignatureBlocks({ model }: { model: ReportModel }) {
  const zone = model.organisation.timeZone;
  const owner = model.signing?.owner;
  return (
    <View style={{ flexDirection: 'row', gap: 12 }} wrap={false}>
      <View style={styles.signatureBlock}>
        <Text style={styles.label}>Assessed by</Text>
        <View style={styles.signatureLine}>
          {model.signing ? (
            <Text
              style={{
                fontSize: 16,
                fontStyle: 'italic',
                color: colours.iron800,
              }}
            >
              {pdfText(model.signing.assessor.name)}
            </Text>
          ) : null}
        </View>
        <Text style={{ fontWeight: 600 }}>{pdfText(model.auditor.name)}</Text>
        <Text style={styles.small}>for {pdfText(model.organisation.name)}</Text>
        <Text style={styles.small}>
          {model.signing
            ? `Sent for signature ${formatDateTime(model.signing.assessor.signedAt, zone)}`
            : 'Date:'}
        </Text>
      </View>
      <View style={styles.signatureBlock}>
        <Text style={styles.label}>Acknowledged by the owner</Text>
        <View style={styles.signatureLine}>
          {owner?.imagePng ? (
            <Image src={owner.imagePng} style={{ height: 50, objectFit: 'contain' }} />
          ) : null}
          {owner && !owner.imagePng ? (
            <Text
              style={{
                fontSize: 16,
                fontStyle: 'italic',
                color: colours.iron800,
              }}
            >
              {pdfText(owner.name)}
            </Text>
          ) : null}
        </View>
        <Text style={{ fontWeight: 600 }}>{owner ? pdfText(owner.name) : 'Name:'}</Text>
        <Text style={styles.small}>
          {owner ? `Signed electronically ${formatDateTime(owner.signedAt, zone)}` : 'Date:'}
        </Text>
      </View>
    </View>
  );
}

function Identity({ model }: { model: ReportModel }) {
  const owner = model.signing?.owner;
  const zone = model.organisation.timeZone;
  const rows: Array<[string, string]> = [
    ['Document id', model.documentId],
    [
      'Assessment',
      model.assessment.id +
        (model.assessment.supersedesId ? ` (revision of ${model.assessment.supersedesId})` : ''),
    ],
    ['Ruleset', `${model.ruleset.title}, version ${model.ruleset.version}`],
    ['Ruleset content SHA-256', model.ruleset.contentSha256],
    ['Result SHA-256', model.assessment.resultSha256 ?? '-'],
    ['Rendered', formatDateTime(model.generatedAt, zone)],
  ];
  if (owner) {
    rows.push(
      ['Signer', `${owner.name} <${owner.email}>`],
      ['Signature', owner.method === 'drawn' ? 'drawn on screen' : 'typed name (no drawing device)'],
      ['Consent', owner.consentText],
      ['Intent', owner.intentText],
      [
        'Cautions acknowledged',
        owner.cautionsAcknowledged.length
          ? owner.cautionsAcknowledged.map((c) => c.title).join('; ')
          : 'none were listed',
      ],
      ['Signed at', formatDateTime(owner.signedAt, zone)],
      ['From address', owner.ip ?? 'not recorded'],
      ['Browser', (owner.userAgent ?? 'not recorded').slice(0, 160)],
      ['SHA-256 of the copy shown', owner.shownPdfSha256],
    );
    const head = model.signing?.auditHead;
    if (head) rows.push(['Audit trail at signing', `event #${head.eventId}, hash ${head.hash}`]);
  }
  const certificate = model.signing?.certificate;
  if (certificate) {
    rows.push(
      ['Signing certificate', certificate.subject],
      [
        'Certificate issued by',
        certificate.selfSigned
          ? 'itself: made for this organisation, not by a public certificate authority'
          : certificate.issuer,
      ],
      ['Certificate SHA-256', fingerprintInWords(certificate.sha256)],
    );
  }
  return (
    <View>
      {rows.map(([name, value]) => (
        <View key={name} style={[styles.row, { marginBottom: 1.5 }]} wrap={false}>
          <Text style={[styles.fieldName, { width: 130, fontSize: 8 }]}>{name}</Text>
          <Text style={[styles.fieldValue, styles.mono]}>{pdfText(value)}</Text>
        </View>
      ))}
      {model.kind === 'signed_report' ? (
        <Text style={[styles.small, { marginTop: 6 }]}>
          This file carries a digital signature of {pdfText(model.organisation.name)}; a PDF reader shows
          whether anything changed after signing.
          {certificate?.selfSigned
            ? ` The signing certificate was made for ${pdfText(model.organisation.name)} by its report software, not issued by a public certificate authority, so a reader shows the signer or issuer as unknown or not trusted. That says nothing about changes to the file. To check who signed it, compare the certificate's SHA-256 fingerprint in the reader's signature details with the one above and with the one the Verify page (${pdfText(model.signing?.verifyUrl ?? '/verify')}) shows for this file.`
            : certificate
              ? ` The signing certificate was issued by ${pdfText(certificate.issuer)}; a reader that trusts that authority names the signer. Its SHA-256 fingerprint is above, and the Verify page (${pdfText(model.signing?.verifyUrl ?? '/verify')}) shows it too.`
              : ''}
        </Text>
      ) : null}
    </View>
  );
}
