#pragma once
// A tiny XML well-formedness checker for the report tests: balanced tags, quoted attributes,
// only known entities, no raw '<' in text. <script>/<style> bodies are taken as raw text (as
// HTML does); <!DOCTYPE> and comments are skipped. Returns every element with its attributes
// (entities decoded) so tests can read data attributes back.
#include <cctype>
#include <map>
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve::test {

struct Element {
  std::string name;
  std::map<std::string, std::string> attrs;
  std::string text;  // directly contained text (decoded), for <text>, <title>, <td>, ...
};

struct ParseResult {
  bool ok = true;
  std::string error;
  std::vector<Element> elements;  // document order
};

inline bool decode_entities(std::string_view in, std::string& out, std::string& error) {
  out.clear();
  for (size_t i = 0; i < in.size(); ++i) {
    if (in[i] == '<') {
      error = "raw '<' in text or attribute";
      return false;
    }
    if (in[i] != '&') {
      out += in[i];
      continue;
    }
    const size_t semi = in.find(';', i);
    if (semi == std::string_view::npos) {
      error = "unterminated entity";
      return false;
    }
    const std::string_view ent = in.substr(i + 1, semi - i - 1);
    if (ent == "amp") out += '&';
    else if (ent == "lt") out += '<';
    else if (ent == "gt") out += '>';
    else if (ent == "quot") out += '"';
    else if (ent == "#39") out += '\'';
    else {
      error = "unknown entity &" + std::string(ent) + ";";
      return false;
    }
    i = semi;
  }
  return true;
}

inline ParseResult parse_markup(std::string_view doc) {
  ParseResult r;
  std::vector<size_t> open;  // indices into r.elements
  const auto fail = [&](const std::string& msg, size_t at) {
    r.ok = false;
    r.error = msg + " at offset " + std::to_string(at) + ": ..." +
              std::string(doc.substr(at, 60)) + "...";
    return r;
  };
  size_t i = 0;
  while (i < doc.size()) {
    if (doc[i] != '<') {
      const size_t next = doc.find('<', i);
      const std::string_view text = doc.substr(i, next == std::string_view::npos ? doc.size() - i : next - i);
      std::string decoded, err;
      if (!decode_entities(text, decoded, err)) return fail(err, i);
      if (!open.empty()) r.elements[open.back()].text += decoded;
      else if (decoded.find_first_not_of(" \n\r\t") != std::string::npos)
        return fail("text outside the root element", i);
      i = next == std::string_view::npos ? doc.size() : next;
      continue;
    }
    if (doc.substr(i, 4) == "<!--") {
      const size_t end = doc.find("-->", i);
      if (end == std::string_view::npos) return fail("unterminated comment", i);
      i = end + 3;
      continue;
    }
    if (doc.substr(i, 2) == "<!") {
      const size_t end = doc.find('>', i);
      if (end == std::string_view::npos) return fail("unterminated declaration", i);
      i = end + 1;
      continue;
    }
    if (doc.substr(i, 2) == "</") {
      const size_t end = doc.find('>', i);
      if (end == std::string_view::npos) return fail("unterminated end tag", i);
      const std::string name(doc.substr(i + 2, end - i - 2));
      if (open.empty() || r.elements[open.back()].name != name)
        return fail("end tag </" + name + "> does not match " +
                        (open.empty() ? std::string("nothing") : "<" + r.elements[open.back()].name + ">"),
                    i);
      open.pop_back();
      i = end + 1;
      continue;
    }
    // Start tag.
    size_t j = i + 1;
    while (j < doc.size() && (std::isalnum(static_cast<unsigned char>(doc[j])) || doc[j] == '-' || doc[j] == ':')) ++j;
    Element e;
    e.name = std::string(doc.substr(i + 1, j - i - 1));
    if (e.name.empty()) return fail("empty tag name", i);
    bool self_closing = false;
    for (;;) {
      while (j < doc.size() && std::isspace(static_cast<unsigned char>(doc[j]))) ++j;
      if (j >= doc.size()) return fail("unterminated start tag", i);
      if (doc[j] == '>') { ++j; break; }
      if (doc.substr(j, 2) == "/>") { self_closing = true; j += 2; break; }
      size_t k = j;
      while (k < doc.size() && doc[k] != '=' && doc[k] != '>' && !std::isspace(static_cast<unsigned char>(doc[k]))) ++k;
      const std::string attr(doc.substr(j, k - j));
      if (k >= doc.size() || doc[k] != '=' || k + 1 >= doc.size() || doc[k + 1] != '"')
        return fail("attribute '" + attr + "' without a double-quoted value", j);
      const size_t close = doc.find('"', k + 2);
      if (close == std::string_view::npos) return fail("unterminated attribute value", j);
      std::string value, err;
      if (!decode_entities(doc.substr(k + 2, close - k - 2), value, err)) return fail(err, k);
      if (!e.attrs.emplace(attr, value).second) return fail("duplicate attribute " + attr, j);
      j = close + 1;
    }
    r.elements.push_back(e);
    if (!self_closing) {
      if (e.name == "script" || e.name == "style") {
        const std::string closing = "</" + e.name + ">";
        const size_t end = doc.find(closing, j);
        if (end == std::string_view::npos) return fail("unterminated <" + e.name + ">", i);
        r.elements.back().text = std::string(doc.substr(j, end - j));
        i = end + closing.size();
        continue;
      }
      open.push_back(r.elements.size() - 1);
    }
    i = j;
  }
  if (!open.empty()) return fail("unclosed <" + r.elements[open.back()].name + ">", doc.size() - 1);
  return r;
}

inline std::vector<Element> find_all(const ParseResult& r, std::string_view name,
                                     std::string_view cls = "") {
  std::vector<Element> out;
  for (const Element& e : r.elements) {
    if (e.name != name) continue;
    if (!cls.empty()) {
      const auto it = e.attrs.find("class");
      if (it == e.attrs.end()) continue;
      const std::string& c = it->second;
      // whole-word class match
      bool hit = false;
      size_t p = 0;
      while ((p = c.find(cls, p)) != std::string::npos) {
        const bool start = p == 0 || c[p - 1] == ' ';
        const bool end = p + cls.size() == c.size() || c[p + cls.size()] == ' ';
        if (start && end) { hit = true; break; }
        ++p;
      }
      if (!hit) continue;
    }
    out.push_back(e);
  }
  return out;
}

// Every occurrence of "http" must be the SVG namespace declaration.
inline int external_urls(std::string_view doc) {
  int count = 0;
  size_t p = 0;
  constexpr std::string_view ns = "http://www.w3.org/2000/svg\"";
  while ((p = doc.find("http", p)) != std::string_view::npos) {
    const bool is_ns = doc.substr(p, ns.size()) == ns && p >= 7 && doc.substr(p - 7, 7) == "xmlns=\"";
    if (!is_ns) ++count;
    p += 4;
  }
  // Other ways to reach the network from a page.
  for (std::string_view needle : {"//cdn", "url(", "@import", "src=\"", "<link"})
    if (doc.find(needle) != std::string_view::npos) ++count;
  return count;
}

}  // namespace lagsieve::test
