// Mail bodies: mjml with handlebars placeholders for the HTML part, plain handlebars for the text part.

const frame = (body: string) => `<mjml>
  <mj-head>
    <mj-attributes>
      <mj-all font-family="Helvetica, Arial, sans-serif" />
      <mj-text font-size="14px" line-height="21px" color="#1d2a33" />
    </mj-attributes>
  </mj-head>
  <mj-body background-color="#f3f5f6">
    <mj-section padding="20px 0 8px">
      <mj-column>
        <mj-text font-size="18px" font-weight="bold" color="#0f4c5c">Driftline</mj-text>
      </mj-column>
    </mj-section>
    <mj-section background-color="#ffffff" padding="16px 8px">
      <mj-column>
${body}
      </mj-column>
    </mj-section>
    <mj-section padding="12px 0">
      <mj-column>
        <mj-text font-size="12px" line-height="18px" color="#5b6b75">{{caution}}</mj-text>
      </mj-column>
    </mj-section>
  </mj-body>
</mjml>`;

const button = (label: string, href: string) =>
  `        <mj-button href="${href}" background-color="#0f4c5c" color="#ffffff" font-size="14px" align="left" border-radius="4px">${label}</mj-button>`;

export const templates = {
  invitation: {
    mjml: frame(`        <mj-text>Hello {{name}},</mj-text>
        <mj-text>{{invitedBy}} invited you to join <strong>{{organization}}</strong> on Driftline as {{roleLabel}}.</mj-text>
${button('Set your password', '{{link}}')}
        <mj-text font-size="12px" color="#5b6b75">The link works once and until {{expires}}. If the button does not open, copy this address into your browser: {{link}}</mj-text>`),
    text: `Hello {{name}},

{{invitedBy}} invited you to join {{organization}} on Driftline as {{roleLabel}}.

Set your password: {{link}}

The link works once and until {{expires}}.

--
{{caution}}`,
  },
  password_reset: {
    mjml: frame(`        <mj-text>Hello {{name}},</mj-text>
        <mj-text>Someone asked to reset the password of your Driftline account {{email}}. If it was you, choose a new password:</mj-text>
${button('Choose a new password', '{{link}}')}
        <mj-text font-size="12px" color="#5b6b75">The link works once, for one hour: until {{expires}}. If the button does not open, copy this address into your browser: {{link}}</mj-text>
        <mj-text font-size="12px" color="#5b6b75">If you did not ask for it, ignore this mail: your password stays as it is. If such mails keep coming, tell {{contact}}.</mj-text>`),
    text: `Hello {{name}},

Someone asked to reset the password of your Driftline account {{email}}. If it was you, choose a new password:

{{link}}

The link works once, for one hour: until {{expires}}.

If you did not ask for it, ignore this mail: your password stays as it is. If such mails keep coming, tell {{contact}}.

--
{{caution}}`,
  },
  password_changed: {
    mjml: frame(`        <mj-text>Hello {{name}},</mj-text>
        <mj-text>The password of your Driftline account {{email}} was changed at {{changed}} through a reset link sent to this address. Every device that was signed in has been signed out.</mj-text>
${button('Sign in', '{{signInLink}}')}
        <mj-text font-size="12px" color="#5b6b75">If this was not you, tell {{contact}} at once.</mj-text>`),
    text: `Hello {{name}},

The password of your Driftline account {{email}} was changed at {{changed}} through a reset link sent to this address. Every device that was signed in has been signed out.

Sign in: {{signInLink}}

If this was not you, tell {{contact}} at once.

--
{{caution}}`,
  },
  remap_notice: {
    mjml: frame(`        <mj-text>Hello {{name}},</mj-text>
        <mj-text><strong>{{headline}}</strong></mj-text>
        <mj-text>{{detail}}</mj-text>
        <mj-text>Site: {{site}}<br />Window: {{window}}</mj-text>
${button('Open the request', '{{link}}')}
        <mj-text font-size="12px" color="#5b6b75">{{#if hasCalendar}}The attached calendar file adds or updates the window in your calendar. {{/if}}Address: {{link}}</mj-text>`),
    text: `Hello {{name}},

{{headline}}

{{detail}}

Site: {{site}}
Window: {{window}}

Open the request: {{link}}

--
{{caution}}`,
  },
} as const;

export type TemplateName = keyof typeof templates;
