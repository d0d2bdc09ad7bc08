// What the shop's pages offer depends on who looks: visitors and collectors get the cart and the ways in,
// the workshop's maker and shipper (who buy nothing here) get neither, in the server-rendered page itself.
import { describe, expect, it } from 'vitest'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { Client, signedIn, useTestServer } from './harness'

await useTestServer()

async function pageAs(client: Client, path: string) {
  const answer = await client.request<string>(path, { headers: { accept: 'text/html' } })
  expect(answer.status).toBe(200)
  return answer.body
}

const signedInAs = async (role: 'maker' | 'shipper' | 'collector') => {
  const account = demoAccounts.find(a => a.role === role)!
  return await signedIn(account.email, account.password)
}

describe('the shop as each role sees it', () => {
  it.each([
    { who: 'a visitor', client: async () => new Client(), cart: true, join: true },
    { who: 'a collector', client: () => signedInAs('collector'), cart: true, join: false },
    { who: 'the maker', client: () => signedInAs('maker'), cart: false, join: false },
    { who: 'the shipper', client: () => signedInAs('shipper'), cart: false, join: false },
  ])('$who: cart shown $cart, account offered $join', async ({ client: make, cart, join }) => {
    const client = await make()
    const listed = await new Client().get('/api/shop/products?kind=recorded')
    const inStock = listed.body.items.find((item: { stock: number }) => item.stock > 0)
    expect(inStock, 'a recorded cylinder in stock in the demo catalogue').toBeTruthy()

    const home = await pageAs(client, '/')
    expect(home.includes('href="/cart"')).toBe(cart)
    expect(home.includes('Create account')).toBe(join)
    expect(home.includes('Create a collector account')).toBe(join)

    const product = await pageAs(client, `/cylinders/${inStock.slug}`)
    expect(product.includes('href="/cart"')).toBe(cart)
    expect(product.includes('Add to cart')).toBe(cart)

    // A personal message is put in the cart by a customer; the workshop's accounts read a line instead.
    const custom = await pageAs(client, '/custom')
    expect(custom.includes('Add to cart')).toBe(cart)
    expect(custom.includes('data-testid="custom-not-shopper"')).toBe(!cart)

    // The cart reached by its address: a plain note for the maker and the shipper, no checkout.
    const cartPage = await pageAs(client, '/cart')
    expect(cartPage.includes('data-testid="cart-not-shopper"')).toBe(!cart)
    expect(cartPage.includes('Loading your cart')).toBe(cart)
  })

  it.each([
    { who: 'a collector', role: 'collector' as const, orders: true },
    { who: 'the maker', role: 'maker' as const, orders: false },
    { who: 'the shipper', role: 'shipper' as const, orders: false },
  ])('$who: the account page offers orders $orders', async ({ role, orders }) => {
    const account = await pageAs(await signedInAs(role), '/account')
    expect(account.includes('Your account')).toBe(true)
    expect(account.includes('See your orders')).toBe(orders)
  })
})
