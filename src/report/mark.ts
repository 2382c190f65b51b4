/** The mark a report page carries in its head: a results folder's report.html with it is foldseal's own. */
export const REPORT_MARK = '<meta name="generator" content="foldseal report">';
