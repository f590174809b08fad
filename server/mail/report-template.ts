import { createRequire } from 'node:module';
import Handlebars from 'handlebars';

// mjml ships without type declarations: the one call made here, typed by hand (mjml@5.4.1).
const mjml2html = createRequire(import.meta.url)('mjml') as (mjml: string, options: { validationLevel: 'strict' }) => Promise<{ html: string; errors: Array<{ formattedMessage: string }> }>;

/** The usual caution of Driftline's pages and mails, in the report footer. */
export const REPORT_CAUTION = 'Driftline informs map maintenance; it does not certify anything. The site’s safety assessment and local regulations rule.';

/** What one site's block of the report shows, already worded (handlebars escapes every value). */
export interface ReportSiteView {
  name: string;
  scoreText: string;
  changeText: string;
  changeColour: string;
  weeks: Array<{ label: string; scoreText: string; bar: number }>;
  facts: Array<{ label: string; value: string }>;
  remapsDone: string[];
  remapsPlanned: string[];
  imageCid: string | null;
  link: string;
}

export interface ReportView {
  organization: string;
  monthLabel: string;
  intro: string;
  sites: ReportSiteView[];
  appLink: string;
  /** The app's read-only page of these figures. */
  reportLink: string;
  /** The recipient's own unsubscribe link; null in the app's preview. */
  unsubscribeLink: string | null;
}

// Tables and inline styles come from mjml; nothing here needs styles in <head> that mail clients drop.
const MJML = `<mjml>
  <mj-head>
    <mj-title>{{organization}} · map health {{monthLabel}}</mj-title>
    <mj-preview>Map health of {{organization}}'s sites in {{monthLabel}}</mj-preview>
    <mj-attributes>
      <mj-all font-family="Helvetica, Arial, sans-serif" />
      <mj-text font-size="14px" line-height="21px" color="#1d2a33" padding="4px 16px" />
    </mj-attributes>
  </mj-head>
  <mj-body background-color="#f3f5f6" width="640px">
    <mj-section padding="20px 0 8px">
      <mj-column>
        <mj-text font-size="18px" font-weight="bold" color="#0f4c5c">Driftline</mj-text>
        <mj-text font-size="22px" line-height="28px" font-weight="bold">Map health in {{monthLabel}}</mj-text>
        <mj-text color="#5b6b75">{{organization}} · {{intro}}</mj-text>
        <mj-text><a href="{{reportLink}}" style="color: #0f4c5c; font-weight: bold;">Read these figures in Driftline</a></mj-text>
      </mj-column>
    </mj-section>
{{#each sites}}
    <mj-section background-color="#ffffff" padding="16px 0" border-top="4px solid #0f4c5c" border-bottom="12px solid #f3f5f6">
      <mj-column>
        <mj-text font-size="17px" font-weight="bold">{{name}}</mj-text>
        <mj-text><span style="font-size: 26px; font-weight: bold;">{{scoreText}}</span> <span style="color: {{changeColour}};">{{changeText}}</span></mj-text>
        <mj-table font-size="13px" padding="8px 16px" cellpadding="3px">
          <tr style="text-align: left; color: #5b6b75;"><th style="font-weight: normal;">Week</th><th style="font-weight: normal;">Agreement</th><th style="font-weight: normal;"></th></tr>
{{#each weeks}}
          <tr><td style="white-space: nowrap;">{{label}}</td><td style="white-space: nowrap;">{{scoreText}}</td><td style="width: 60%;"><div style="background-color: #0f4c5c; height: 8px; width: {{bar}}%;"></div></td></tr>
{{/each}}
        </mj-table>
        <mj-table font-size="13px" padding="8px 16px" cellpadding="3px">
{{#each facts}}
          <tr><td style="color: #5b6b75; width: 55%;">{{label}}</td><td style="font-weight: bold;">{{value}}</td></tr>
{{/each}}
        </mj-table>
{{#if remapsDone.length}}
        <mj-text font-size="13px"><strong>Remaps verified:</strong> {{#each remapsDone}}{{this}}{{#unless @last}}; {{/unless}}{{/each}}</mj-text>
{{/if}}
{{#if remapsPlanned.length}}
        <mj-text font-size="13px"><strong>Remaps planned:</strong> {{#each remapsPlanned}}{{this}}{{#unless @last}}; {{/unless}}{{/each}}</mj-text>
{{/if}}
{{#if imageCid}}
        <mj-image src="cid:{{imageCid}}" alt="Map of {{name}} with its open zones outlined" width="560px" padding="8px 16px" border="1px solid #d5dae3" />
        <mj-text font-size="12px" color="#5b6b75"><span style="color: #e38b1b;">■</span> new structure <span style="color: #6a4bd6;">■</span> missing structure <span style="color: #1c9a8a;">■</span> unmapped area</mj-text>
{{/if}}
        <mj-button href="{{link}}" background-color="#0f4c5c" color="#ffffff" font-size="14px" align="left" border-radius="4px" padding="10px 16px">Open {{name}} in Driftline</mj-button>
      </mj-column>
    </mj-section>
{{/each}}
    <mj-section padding="12px 0 24px">
      <mj-column>
        <mj-text font-size="12px" line-height="18px" color="#5b6b75">{{caution}}</mj-text>
        <mj-text font-size="12px" line-height="18px" color="#5b6b75">All sites: <a href="{{appLink}}" style="color: #0f4c5c;">{{appLink}}</a></mj-text>
{{#if unsubscribeLink}}
        <mj-text font-size="12px" line-height="18px" color="#5b6b75">You receive this monthly report as a recipient of {{organization}}. <a href="{{unsubscribeLink}}" style="color: #0f4c5c;">Unsubscribe</a></mj-text>
{{else}}
        <mj-text font-size="12px" line-height="18px" color="#5b6b75">Each recipient's copy ends with their own unsubscribe link.</mj-text>
{{/if}}
      </mj-column>
    </mj-section>
  </mj-body>
</mjml>`;

const TEXT = `Map health in {{monthLabel}} — {{organization}}
{{intro}}
Read these figures in Driftline: {{reportLink}}
{{#each sites}}

== {{name}} ==
Health score: {{scoreText}} {{changeText}}
Agreement by week:
{{#each weeks}}
  {{label}}: {{scoreText}}
{{/each}}
{{#each facts}}
{{label}}: {{value}}
{{/each}}
{{#if remapsDone.length}}
Remaps verified: {{#each remapsDone}}{{this}}{{#unless @last}}; {{/unless}}{{/each}}
{{/if}}
{{#if remapsPlanned.length}}
Remaps planned: {{#each remapsPlanned}}{{this}}{{#unless @last}}; {{/unless}}{{/each}}
{{/if}}
Open in Driftline: {{link}}
{{/each}}

All sites: {{appLink}}

--
{{caution}}
{{#if unsubscribeLink}}
Unsubscribe: {{unsubscribeLink}}
{{/if}}
`;

const html = Handlebars.compile(MJML, { strict: true });
const text = Handlebars.compile(TEXT, { strict: true, noEscape: true });

/** The report's HTML (mjml, validated strictly) and plain-text parts. */
export async function renderReport(view: ReportView): Promise<{ html: string; text: string }> {
  const context = { ...view, caution: REPORT_CAUTION };
  const out = await mjml2html(html(context), { validationLevel: 'strict' });
  if (out.errors.length > 0) throw new Error(`The report template is invalid: ${out.errors.map((e) => e.formattedMessage).join('; ')}`);
  return { html: out.html, text: text(context).replace(/\n{3,}/g, '\n\n') };
}
