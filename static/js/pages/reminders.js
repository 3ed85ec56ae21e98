// In-app reminders for due checks, reassessments and follow-up visits: polls /api/v1/due
// while the page is open and, where the phone allows it, shows a notification once per item.
const box = document.getElementById("reminders");
const allow = document.getElementById("allow-notifications");
const words = JSON.parse(document.getElementById("reminder-words").textContent);
const POLL_MS = 60_000;
const seen = new Set(JSON.parse(sessionStorage.getItem("reminders-seen") || "[]"));

function notify(items) {
  if (!("Notification" in window) || Notification.permission !== "granted") return;
  for (const item of items) {
    const key = `${item.case_id}:${item.kind}:${item.due_at || item.due_date}`;
    if (seen.has(key)) continue;
    seen.add(key);
    new Notification(words.title, { body: words[item.kind] || words.visit, tag: key });
  }
  sessionStorage.setItem("reminders-seen", JSON.stringify([...seen]));
}

async function poll() {
  try {
    const response = await fetch("/api/v1/due", { credentials: "same-origin", cache: "no-store" });
    if (!response.ok) return;
    const body = await response.json();
    const due = body.items.filter((item) => item.due);
    const visits = body.visits.map((visit) => ({ ...visit, kind: "visit" }));
    const total = due.length + visits.length;
    box.textContent = total ? words.count.replace("%(n)s", String(total)) : words.none;
    notify([...due, ...visits]);
  } catch {
    // Out of range: the list on the page stays as it was drawn.
  }
}

if (allow && "Notification" in window && Notification.permission === "default") {
  allow.hidden = false;
  allow.addEventListener("click", async () => {
    await Notification.requestPermission();
    allow.hidden = true;
    poll();
  });
}
poll();
setInterval(poll, POLL_MS);
