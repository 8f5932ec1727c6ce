// flashduty from C++: RAII wrappers over the C interface (handles freed by their owners,
// errors thrown as exceptions carrying the stable kind and the field). Invented example: an
// equimolar benzene-toluene feed heated from 25 degC to 120 degC at 1 atm, then the outlet
// found again from the duty. Built and run by .ci/run.
//
// Results are estimates from ideal-mixture models; equipment design and operation follow the
// applicable local codes and the judgement of a qualified, licensed engineer.
#include "flashduty.h"

#include <cstdio>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace flashduty {

class Error : public std::runtime_error {
  public:
    Error(std::string kind, std::string field, const std::string &message)
        : std::runtime_error(message), kind(std::move(kind)), field(std::move(field)) {}
    std::string kind, field;
};

template <typename Handle, size_t (*Get)(const Handle *, FdErrorPart, char *, size_t)>
Error last_error(const Handle *h) {
    auto part = [h](FdErrorPart p) {
        std::string s(Get(h, p, nullptr, 0) + 1, '\0');
        Get(h, p, s.data(), s.size());
        s.resize(s.size() - 1);
        return s;
    };
    return Error(part(FD_ERROR_PART_KIND), part(FD_ERROR_PART_FIELD), part(FD_ERROR_PART_MESSAGE));
}

class Library {
  public:
    Library() : h_(fd_library_new(), fd_library_free) {
        if (!h_) throw std::runtime_error("flashduty: the built-in library could not be read");
    }
    std::string run(const std::string &command, const std::string &case_json) const {
        char *out = nullptr;
        FdStatus s = fd_run_case(h_.get(), command.c_str(), case_json.c_str(), &out);
        std::unique_ptr<char, void (*)(char *)> owned(out, fd_string_free);
        if (s != FD_STATUS_OK) throw last_error<FdLibrary, fd_library_error>(h_.get());
        return owned.get();
    }
    FdLibrary *get() const { return h_.get(); }

  private:
    std::unique_ptr<FdLibrary, void (*)(FdLibrary *)> h_;
};

class Calculator {
  public:
    Calculator(const Library &lib, const std::vector<std::string> &names, const std::vector<double> &z,
               double flow_mol_s, FdOptions options = fd_options_default())
        : h_(nullptr, fd_calculator_free) {
        std::vector<const char *> c_names;
        for (const auto &n : names) c_names.push_back(n.c_str());
        h_.reset(fd_calculator_new(lib.get(), c_names.data(), z.data(), z.size(), flow_mol_s, &options));
        if (!h_) throw last_error<FdLibrary, fd_library_error>(lib.get());
    }
    FdDuty duty(FdState in, FdState out) const {
        FdDuty d;
        check(fd_calculator_duty(h_.get(), in, out, &d));
        return d;
    }
    FdDuty outlet_for_duty(FdState in, double duty_w, double p_out_pa) const {
        FdDuty d;
        check(fd_calculator_outlet_for_duty(h_.get(), in, duty_w, p_out_pa, &d));
        return d;
    }

  private:
    void check(FdStatus s) const {
        if (s != FD_STATUS_OK) throw last_error<FdCalculator, fd_calculator_error>(h_.get());
    }
    std::unique_ptr<FdCalculator, void (*)(FdCalculator *)> h_;
};

FdState tp(double t_k, double p_pa) { return FdState{FD_STATE_SPEC_TEMPERATURE_PRESSURE, t_k, p_pa, 0.0}; }

}  // namespace flashduty

int main() {
    using namespace flashduty;
    Library lib;
    Calculator calc(lib, {"benzene", "toluene"}, {0.5, 0.5}, 10.0);
    FdDuty d = calc.duty(tp(298.15, 101325.0), tp(393.15, 101325.0));
    std::printf("duty %.1f kW, outlet vapour fraction %.3f\n", d.duty_w / 1e3, d.outlet.vapour_fraction);
    FdDuty back = calc.outlet_for_duty(tp(298.15, 101325.0), d.duty_w, 101325.0);
    std::printf("outlet found from the duty: %.6f K\n", back.outlet.temperature_k);
    std::printf("%s\n", lib.run("bubble", R"({"components": ["benzene", "toluene"], "z": [0.5, 0.5], "P": "1 atm"})")
                            .substr(0, 60)
                            .c_str());
    try {
        Calculator bad(lib, {"benzene", "unobtainium"}, {0.5, 0.5}, 1.0);
        return 1;
    } catch (const Error &e) {
        std::printf("refused: kind %s, field %s: %s\n", e.kind.c_str(), e.field.c_str(), e.what());
        if (e.kind != "unknown-component") return 1;
    }
    return (back.outlet.temperature_k > 393.15 - 1e-6 && back.outlet.temperature_k < 393.15 + 1e-6) ? 0 : 1;
}
