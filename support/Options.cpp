// Options.cpp - the command-line option parser: declarations, then one pass over the arguments.
#include "Options.h"

#include <algorithm>
#include <cassert>

namespace saltpan {

OptionParser::Option &OptionParser::declare(const std::string &name) {
  assert(!options_.count(name) && "an option declared twice");
  return options_[name];
}

void OptionParser::flag(const std::string &name, bool &into) { declare(name).flag = &into; }

void OptionParser::stop(const std::vector<std::string> &names, std::function<int()> action) {
  for (const std::string &name : names)
    declare(name).stop = action;
}

OptionParser::Valued &OptionParser::value(const std::string &name, Handler handler) {
  Valued &v = valued_[name];
  v.handler_ = std::move(handler);
  declare(name).valued = &v;
  return v;
}

OptionParser::Valued &OptionParser::value(const std::string &name, std::string &into) {
  return value(name, [&into](const std::string &v) {
    into = v;
    return std::string();
  });
}

OptionParser::Valued &OptionParser::repeated(const std::string &name, std::vector<std::string> &into) {
  return value(name, [&into](const std::string &v) {
    into.push_back(v);
    return std::string();
  });
}

void OptionParser::positional(Handler handler) { positional_ = std::move(handler); }

void OptionParser::positional(std::vector<std::string> &into) {
  positional([&into](const std::string &v) {
    into.push_back(v);
    return std::string();
  });
}

void OptionParser::positional(std::string &into, const std::string &another) {
  positional([&into, another](const std::string &v) {
    if (!into.empty())
      return another;
    into = v;
    return std::string();
  });
}

// An argument that is no declared option (or a valued one with nothing after it).
std::string OptionParser::refuse(const std::string &arg) const {
  return unknown_ ? unknown_(arg) : "unknown option '" + arg + "'";
}

std::optional<int> OptionParser::parse(const std::vector<std::string> &args,
                                       const std::function<int(const std::string &)> &usage) const {
  auto go = [&](const std::string &error) -> std::optional<int> {
    if (error.empty())
      return std::nullopt;
    return usage(error);
  };
  bool optionsEnded = false;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string &a = args[i];
    bool isOption = !optionsEnded && a.size() > 1 && a[0] == '-';
    if (!isOption) {
      if (auto code = go(positional_ ? positional_(a) : refuse(a)))
        return code;
      continue;
    }
    if (endOfOptions_ && a == "--") {
      optionsEnded = true;
      continue;
    }
    std::string error;
    if (auto it = options_.find(a); it != options_.end()) {
      const Option &o = it->second;
      if (o.flag) {
        *o.flag = true;
      } else if (o.stop) {
        return o.stop();
      } else if (i + 1 < args.size()) {
        error = o.valued->handler_(args[++i]);
      } else if (!o.valued->ifMissing_.empty()) {
        error = o.valued->ifMissing_;
      } else {
        error = missing_ == MissingValue::NeedsAValue ? a + " needs a value" : refuse(a);
      }
    } else if (size_t eq = a.find('='); eq != std::string::npos) {
      auto named = options_.find(a.substr(0, eq));
      if (named != options_.end() && named->second.valued && named->second.valued->equalsForm_)
        error = named->second.valued->handler_(a.substr(eq + 1));
      else
        error = refuse(a);
    } else {
      error = refuse(a);
    }
    if (auto code = go(error))
      return code;
  }
  return std::nullopt;
}

OptionParser::Handler oneOf(std::string &into, std::vector<std::string> allowed, std::string message) {
  return [&into, allowed = std::move(allowed), message = std::move(message)](const std::string &v) {
    into = v;
    if (std::find(allowed.begin(), allowed.end(), v) != allowed.end())
      return std::string();
    std::string refusal = message;
    if (size_t at = refusal.find("{}"); at != std::string::npos)
      refusal.replace(at, 2, v);
    return refusal;
  };
}

bool namesOption(const std::string &arg, const std::string &name) {
  return arg == name || arg.rfind(name + "=", 0) == 0;
}

bool wholeNumber(const std::string &text, long low, long high, long &into) {
  if (text.empty() || text.size() > 16 || text.find_first_not_of("0123456789") != std::string::npos)
    return false;
  into = std::stol(text);
  return into >= low && into <= high;
}

} // namespace saltpan
