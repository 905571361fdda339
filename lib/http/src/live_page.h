#pragma once
// The live page served at "/": one self-contained HTML document (style and script inline,
// no outside assets) that polls the JSON API.
#include <string>

namespace dewmargin::http_detail {

const std::string& live_page_html();

}  // namespace dewmargin::http_detail
