//! Plain text as escaped HTML: the methods paragraph and the reading notes are written
//! once as text and shown on the page through this.

use std::fmt::Write as _;

use super::esc;

/// Plain text (blank-line separated blocks; lines starting with "- " are list items,
/// indented lines continue the item above) as escaped HTML paragraphs and lists.
pub(super) fn prose(text: &str) -> String {
    let mut html = String::new();
    for block in text.split("\n\n").filter(|b| !b.trim().is_empty()) {
        let mut paragraph: Vec<&str> = Vec::new();
        let mut items: Vec<String> = Vec::new();
        for line in block.lines() {
            let trimmed = line.trim();
            if let Some(item) = trimmed.strip_prefix("- ") {
                html.push_str(&paragraph_html(&mut paragraph));
                items.push(item.to_string());
            } else if let Some(last) = items.last_mut().filter(|_| line.starts_with(' ')) {
                last.push(' ');
                last.push_str(trimmed);
            } else if !trimmed.is_empty() {
                html.push_str(&list(&mut items));
                paragraph.push(trimmed);
            }
        }
        html.push_str(&paragraph_html(&mut paragraph));
        html.push_str(&list(&mut items));
    }
    html
}

/// The collected lines as one paragraph (the browser reflows them); empties the buffer.
fn paragraph_html(lines: &mut Vec<&str>) -> String {
    if lines.is_empty() {
        return String::new();
    }
    let html = format!("<p>{}</p>\n", esc(&lines.join(" ")));
    lines.clear();
    html
}

/// The collected items as a list; empties the buffer.
fn list(items: &mut Vec<String>) -> String {
    if items.is_empty() {
        return String::new();
    }
    let mut html = String::from("<ul>\n");
    for item in items.drain(..) {
        let _ = writeln!(html, "<li>{}</li>", esc(&item));
    }
    html.push_str("</ul>\n");
    html
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn prose_keeps_paragraphs_and_lists() {
        let html =
            prose("Title line\n  - first item\n    continues\n  - second <b>\n\nNext & last.");
        assert_eq!(
            html,
            "<p>Title line</p>\n<ul>\n<li>first item continues</li>\n<li>second &lt;b&gt;</li>\n</ul>\n<p>Next &amp; last.</p>\n"
        );
    }
}
