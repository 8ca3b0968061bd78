#pragma once
// Lag polynomials: products, expansions, roots, and the partial-autocorrelation
// reparametrisation that keeps AR/denominator polynomials stationary and MA invertible.
#include <complex>
#include <span>
#include <vector>

#include "core/spec.h"
#include "model/params.h"

namespace lagsieve {

// phi(B) Phi(B^S) written as 1 - sum_k a_k B^k; returns a_1..a_{p+S*P}.
std::vector<double> expand_ar(std::span<const double> phi, std::span<const double> seasonal_phi,
                              int period);
// theta(B) Theta(B^S) written as 1 + sum_k m_k B^k; returns m_1..m_{q+S*Q}.
std::vector<double> expand_ma(std::span<const double> theta, std::span<const double> seasonal_theta,
                              int period);

// psi-weights psi_0..psi_{count-1} of (1 + sum m_k B^k) / (1 - sum a_k B^k).
std::vector<double> psi_weights(std::span<const double> ar, std::span<const double> ma, int count);

// Impulse-response weights v_0..v_{count-1} of omega(B) B^b / delta(B).
std::vector<double> impulse_response(const InputOrder& order, const InputParams& p, int count);

// x_t = [omega(B) B^b / delta(B)] u_t with zero pre-sample values of u and x (the zero start;
// p.state is ignored: also the response to error sequences that are zero before an origin).
std::vector<double> transfer_response(std::span<const double> u, const InputOrder& order,
                                      const InputParams& p);

// The homogeneous solution g of delta(B) g = 0 over n values with g_k = state_k for k < r (and
// the recursion g_t = sum_j delta_j g_{t-j} after): how an estimated filter start decays.
std::vector<double> homogeneous_solution(std::span<const double> delta,
                                         std::span<const double> state, int n);

// In place, for the likelihood's regressor columns: the homogeneous solution over out.size()
// values that is 1 at position `unit` and 0 at the other first r positions.
void homogeneous_unit_solution(std::span<const double> delta, int unit, std::span<double> out);

// transfer_response plus the input's estimated start (p.state; none when empty) from row
// `anchor` on: the output deviates from the zero start by state_k at row anchor + k, decaying
// by delta(B) after. Rows before the anchor keep the zero start.
std::vector<double> transfer_output(std::span<const double> u, const InputOrder& order,
                                    const InputParams& p, int anchor);

// Maps unconstrained reals to coefficients a_1..a_k of a polynomial 1 - sum a_j B^j whose roots
// lie outside the unit circle: z -> tanh(z) = partial autocorrelations -> Durbin-Levinson.
void pacf_to_coefficients(std::span<const double> unconstrained, std::span<double> coef);
// The inverse; returns false when the polynomial is not strictly stationary.
bool coefficients_to_pacf(std::span<const double> coef, std::span<double> unconstrained);

// Roots of 1 - sum a_j B^j (sign = -1) or 1 + sum a_j B^j (sign = +1), in B.
std::vector<std::complex<double>> polynomial_roots(std::span<const double> a, double sign);

// Smallest root modulus; +inf for an empty polynomial.
double min_root_modulus(std::span<const double> a, double sign);

}  // namespace lagsieve
