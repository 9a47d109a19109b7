// Minimal XML checker shared by the SVG and HTML report tests: enough of XML to prove the renderers' output parses
// (balanced tags, quoted attributes, only the five predefined entities of XML 1.0 §4.6, one root; see
// docs/references.md [R-XML-SVG]) and to read elements and attributes back. A leading <!DOCTYPE ...> and
// <!-- comments --> are accepted so an XHTML-compatible HTML document can be checked too. Not a general XML parser:
// no CDATA, no processing instructions.
#pragma once

#include <cctype>
#include <cstddef>
#include <map>
#include <string>
#include <vector>

namespace linkrise::xml_check {

struct Element {
  std::string name;
  std::map<std::string, std::string> attributes;
  std::string text;          // direct character data, entities left as written
  int parent = -1;           // index into ParseResult::elements, -1 for the root
};

struct ParseResult {
  bool ok = true;
  std::string error;
  std::vector<Element> elements;  // in document order
  std::string root;
};

inline bool valid_entity_at(const std::string& s, std::size_t at) {
  static const char* named[] = {"&amp;", "&lt;", "&gt;", "&quot;", "&apos;"};
  for (const char* entity : named) {
    if (s.compare(at, std::char_traits<char>::length(entity), entity) == 0) return true;
  }
  return false;
}

inline bool is_name_char(char c) {
  return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == ':' || c == '.';
}

inline ParseResult parse_xml(const std::string& s) {
  ParseResult result;
  std::vector<std::string> open;
  std::vector<std::size_t> open_index;
  std::size_t i = 0;
  const auto fail = [&](const std::string& why) {
    result.ok = false;
    result.error = why + " at offset " + std::to_string(i);
    return result;
  };
  // An HTML document type declaration may come first (after optional white space).
  while (i < s.size() && std::isspace(static_cast<unsigned char>(s[i]))) ++i;
  if (s.compare(i, 9, "<!DOCTYPE") == 0) {
    const std::size_t end = s.find('>', i);
    if (end == std::string::npos) return fail("unterminated DOCTYPE");
    i = end + 1;
  }
  bool root_closed = false;
  while (i < s.size()) {
    if (s.compare(i, 4, "<!--") == 0) {
      const std::size_t end = s.find("-->", i + 4);
      if (end == std::string::npos) return fail("unterminated comment");
      if (s.substr(i + 4, end - i - 4).find("--") != std::string::npos) return fail("'--' inside comment");
      i = end + 3;
      continue;
    }
    if (s[i] != '<') {
      if (s[i] == '&' && !valid_entity_at(s, i)) return fail("bad entity");
      if (s[i] == '>') return fail("raw '>' in text");
      const bool space = std::isspace(static_cast<unsigned char>(s[i]));
      if (open.empty() && !space) return fail("text outside root");
      if (!open_index.empty()) result.elements[open_index.back()].text += s[i];
      ++i;
      continue;
    }
    if (root_closed) return fail("content after root");
    ++i;
    const bool closing = i < s.size() && s[i] == '/';
    if (closing) ++i;
    std::string name;
    while (i < s.size() && is_name_char(s[i])) name += s[i++];
    if (name.empty()) return fail("empty tag name");
    if (closing) {
      if (i >= s.size() || s[i] != '>') return fail("bad closing tag");
      ++i;
      if (open.empty() || open.back() != name) return fail("mismatched </" + name + ">");
      open.pop_back();
      open_index.pop_back();
      if (open.empty()) root_closed = true;
      continue;
    }
    Element element;
    element.name = name;
    element.parent = open_index.empty() ? -1 : static_cast<int>(open_index.back());
    bool self_closing = false;
    while (true) {
      while (i < s.size() && std::isspace(static_cast<unsigned char>(s[i]))) ++i;
      if (i >= s.size()) return fail("unterminated tag");
      if (s[i] == '>') {
        ++i;
        break;
      }
      if (s[i] == '/') {
        if (i + 1 >= s.size() || s[i + 1] != '>') return fail("bad '/'");
        i += 2;
        self_closing = true;
        break;
      }
      std::string attribute;
      while (i < s.size() && is_name_char(s[i])) attribute += s[i++];
      if (attribute.empty()) return fail("bad attribute name");
      if (element.attributes.count(attribute)) return fail("duplicate attribute");
      if (i + 1 >= s.size() || s[i] != '=' || s[i + 1] != '"') return fail("attribute without quoted value");
      i += 2;
      std::string value;
      while (i < s.size() && s[i] != '"') {
        if (s[i] == '<') return fail("'<' in attribute");
        if (s[i] == '&' && !valid_entity_at(s, i)) return fail("bad entity");
        value += s[i++];
      }
      if (i >= s.size()) return fail("unterminated attribute");
      ++i;
      element.attributes[attribute] = value;
    }
    if (open.empty()) {
      if (!result.root.empty()) return fail("second root");
      result.root = name;
    }
    result.elements.push_back(element);
    if (self_closing) {
      if (open.empty()) root_closed = true;
    } else {
      open.push_back(name);
      open_index.push_back(result.elements.size() - 1);
    }
  }
  if (!open.empty()) return fail("unclosed <" + open.back() + ">");
  if (result.root.empty()) return fail("no root");
  return result;
}

inline std::vector<const Element*> find_all(const ParseResult& doc, const std::string& name) {
  std::vector<const Element*> found;
  for (const Element& e : doc.elements) {
    if (e.name == name) found.push_back(&e);
  }
  return found;
}

/// True when element `index` lies (at any depth) inside element `ancestor`.
inline bool is_inside(const ParseResult& doc, int index, int ancestor) {
  for (int p = doc.elements[index].parent; p >= 0; p = doc.elements[p].parent) {
    if (p == ancestor) return true;
  }
  return false;
}

/// Index of the first element with attribute id == `id`, or -1.
inline int find_id(const ParseResult& doc, const std::string& id) {
  for (std::size_t e = 0; e < doc.elements.size(); ++e) {
    auto it = doc.elements[e].attributes.find("id");
    if (it != doc.elements[e].attributes.end() && it->second == id) return static_cast<int>(e);
  }
  return -1;
}

/// Elements named `name` inside element `ancestor`.
inline int count_inside(const ParseResult& doc, int ancestor, const std::string& name) {
  int count = 0;
  for (std::size_t e = 0; e < doc.elements.size(); ++e) {
    if (doc.elements[e].name == name && is_inside(doc, static_cast<int>(e), ancestor)) ++count;
  }
  return count;
}

/// Table body rows (<tr> elements whose parent is a <tbody>) of the table with `id`, in document order.
inline std::vector<int> body_rows(const ParseResult& doc, const std::string& id) {
  const int table = find_id(doc, id);
  std::vector<int> rows;
  for (int i = 0; table >= 0 && i < static_cast<int>(doc.elements.size()); ++i) {
    const Element& e = doc.elements[i];
    if (e.name == "tr" && e.parent >= 0 && doc.elements[e.parent].name == "tbody" &&
        doc.elements[e.parent].parent == table) {
      rows.push_back(i);
    }
  }
  return rows;
}

/// The cells (<td>) of one row, as written (entities unresolved).
inline std::vector<std::string> cells(const ParseResult& doc, int row) {
  std::vector<std::string> texts;
  for (const Element& e : doc.elements) {
    if (e.name == "td" && e.parent == row) texts.push_back(e.text);
  }
  return texts;
}

}  // namespace linkrise::xml_check
