// Sort a table by the column whose header button is clicked: numbers by data-sort, text by
// its content; empty values always last.
document.querySelectorAll("table.sortable").forEach(function (table) {
  var heads = table.tHead.rows[0].cells;
  Array.prototype.forEach.call(heads, function (th, col) {
    var button = th.querySelector("button");
    if (!button) return;
    button.addEventListener("click", function () {
      var asc = th.getAttribute("aria-sort") !== "ascending";
      Array.prototype.forEach.call(heads, function (h) { h.removeAttribute("aria-sort"); });
      th.setAttribute("aria-sort", asc ? "ascending" : "descending");
      var numeric = th.classList.contains("n");
      var body = table.tBodies[0];
      var rows = Array.prototype.slice.call(body.rows);
      var key = function (row) {
        var cell = row.cells[col];
        var v = cell.hasAttribute("data-sort") ? cell.getAttribute("data-sort") : cell.textContent.trim();
        return numeric && v !== "" ? parseFloat(v) : v;
      };
      rows.sort(function (a, b) {
        var x = key(a), y = key(b);
        if (x === "" || y === "") return (x === "") - (y === "");
        var c = numeric ? x - y : String(x).localeCompare(String(y), undefined, { numeric: true });
        return asc ? c : -c;
      });
      rows.forEach(function (r) { body.appendChild(r); });
    });
  });
});
