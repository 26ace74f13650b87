import { Marked } from 'marked';
import sanitizeHtml from 'sanitize-html';

// Notes, descriptions and comments are markdown, rendered once on the server and sanitised
// before they are stored: the pages print the stored HTML as it is.

const marked = new Marked({ gfm: true, breaks: true, async: false });

const ALLOWED: sanitizeHtml.IOptions = {
	allowedTags: ['p', 'br', 'strong', 'em', 'del', 'code', 'pre', 'blockquote', 'ul', 'ol', 'li', 'a', 'h3', 'h4', 'h5', 'h6', 'hr', 'table', 'thead', 'tbody', 'tr', 'th', 'td', 'sub', 'sup'],
	allowedAttributes: { a: ['href', 'title'], th: ['align'], td: ['align'], code: ['class'] },
	allowedSchemes: ['http', 'https', 'mailto'],
	allowedSchemesAppliedToAttributes: ['href'],
	allowProtocolRelative: false,
	// Headings a note writes sit under the page's own: h1/h2 become h3.
	transformTags: {
		h1: 'h3',
		h2: 'h3',
		a: sanitizeHtml.simpleTransform('a', { rel: 'nofollow noopener noreferrer' })
	},
	allowedClasses: { code: [/^language-[a-z0-9-]+$/] }
};

/** Markdown → sanitised HTML (scripts, event handlers, styles and javascript: links removed). */
export function renderMarkdown(md: string): string {
	const raw = marked.parse(md ?? '') as string;
	return sanitizeHtml(raw, { ...ALLOWED, allowedAttributes: { ...ALLOWED.allowedAttributes, a: ['href', 'title', 'rel'] } }).trim();
}
